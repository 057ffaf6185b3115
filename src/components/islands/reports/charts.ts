import { BarElement, CategoryScale, Chart, Legend, LinearScale, LineElement, PointElement, Tooltip, type ChartOptions } from 'chart.js';

// Only the parts the report charts draw; react-chartjs-2 registers each chart's own controller.
Chart.register(CategoryScale, LinearScale, BarElement, PointElement, LineElement, Tooltip, Legend);
Chart.defaults.font.family = '"Inter Variable", system-ui, sans-serif';
Chart.defaults.color = '#3e4a53';

/** The palette: timber, galvanized steel, moss and rust (tailwind.config.mjs). */
export const COLOURS = { timber: '#9a5c2f', galv: '#5e717e', moss: '#4f7a32', rust: '#b4441f', sand: '#c8915c', steel: '#1f262b' };

export type Fill = 'solid' | 'stripes' | 'dots' | 'cross';

/**
 * A fill that reads without colour: solid, diagonal stripes, dots or cross-hatch over the
 * colour. Canvas patterns exist only in the browser; on the server the colour stands in.
 */
export function fill(colour: string, kind: Fill): string | CanvasPattern {
  if (kind === 'solid' || typeof document === 'undefined') return colour;
  const c = document.createElement('canvas');
  c.width = 8;
  c.height = 8;
  const g = c.getContext('2d');
  if (!g) return colour;
  g.fillStyle = colour;
  g.fillRect(0, 0, 8, 8);
  g.strokeStyle = 'rgba(255,255,255,0.85)';
  g.fillStyle = 'rgba(255,255,255,0.85)';
  g.lineWidth = 2;
  if (kind === 'stripes' || kind === 'cross') {
    g.beginPath();
    g.moveTo(0, 8); g.lineTo(8, 0); g.moveTo(-2, 2); g.lineTo(2, -2); g.moveTo(6, 10); g.lineTo(10, 6);
    g.stroke();
  }
  if (kind === 'cross') {
    g.beginPath();
    g.moveTo(0, 0); g.lineTo(8, 8);
    g.stroke();
  }
  if (kind === 'dots') {
    g.beginPath();
    g.arc(4, 4, 1.6, 0, Math.PI * 2);
    g.fill();
  }
  return g.createPattern(c, 'repeat') ?? colour;
}

/** Point shapes that tell series apart without colour. */
export const POINT_STYLES = ['circle', 'triangle', 'rect', 'rectRot', 'star', 'crossRot', 'cross', 'rectRounded'] as const;

export const dollars = (cents: number) => cents / 100;
export const money0 = (v: number | string) => `$${Number(v).toLocaleString('en-US', { maximumFractionDigits: 0 })}`;
export const money2 = (v: number | string) => `$${Number(v).toLocaleString('en-US', { minimumFractionDigits: 2, maximumFractionDigits: 2 })}`;

/** Options every report chart shares: responsive, legend with the fills, no animation. */
export function baseOptions<T extends 'bar' | 'line' | 'scatter'>(extra: ChartOptions<T> = {} as ChartOptions<T>): ChartOptions<T> {
  return {
    responsive: true,
    maintainAspectRatio: false,
    animation: false,
    plugins: { legend: { position: 'bottom', labels: { usePointStyle: false, boxWidth: 18 } } },
    ...extra,
  } as ChartOptions<T>;
}
