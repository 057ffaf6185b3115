import type { RunInput, GateInput } from '../../../lib/takeoff/input';
import type { Takeoff } from '../../../lib/takeoff/takeoff';

interface Props {
  runs: RunInput[];
  gates: GateInput[];
  takeoff: Takeoff | null;
}

interface Placed { x0: number; y0: number; dx: number; dy: number; run: RunInput }

/** Lays the runs out in feet: a connected run starts where the one before it ends. */
export function placeRuns(runs: RunInput[]): Placed[] {
  const out: Placed[] = [];
  let cx = 0, cy = 0, freeY = 0;
  runs.forEach((run, i) => {
    const rad = (run.headingDeg * Math.PI) / 180;
    const dx = Math.cos(rad), dy = -Math.sin(rad);
    if (i > 0 && !run.connectsToPrevious) {
      const ys = out.flatMap((p) => [p.y0, p.y0 + p.dy * p.run.lengthFt]);
      freeY = Math.max(...ys) + 12;
      cx = 0; cy = freeY;
    }
    out.push({ x0: cx, y0: cy, dx, dy, run });
    cx += dx * run.lengthFt;
    cy += dy * run.lengthFt;
  });
  return out;
}

/** A plan of the runs drawn to scale, with posts, gates and a scale bar. */
export default function PlanSketch({ runs, gates, takeoff }: Props) {
  if (!runs.length) return null;
  const placed = placeRuns(runs);
  const xs = placed.flatMap((p) => [p.x0, p.x0 + p.dx * p.run.lengthFt]);
  const ys = placed.flatMap((p) => [p.y0, p.y0 + p.dy * p.run.lengthFt]);
  const pad = 6;
  const minX = Math.min(...xs) - pad, maxX = Math.max(...xs) + pad, minY = Math.min(...ys) - pad, maxY = Math.max(...ys) + pad;
  // Widen or heighten the box to about 5:2 so text and posts keep one size on screen.
  let w = Math.max(maxX - minX, 30), h = Math.max(maxY - minY, 12);
  let x0 = minX, y0 = minY;
  if (w < h * 2.5) { x0 -= (h * 2.5 - w) / 2; w = h * 2.5; }
  if (h < w / 2.5) { y0 -= (w / 2.5 - h) / 2; h = w / 2.5; }
  const scaleFt = w > 200 ? 50 : w > 80 ? 20 : 10;
  const stroke = w / 500;
  const at = (p: Placed, ft: number) => [p.x0 + p.dx * ft, p.y0 + p.dy * ft] as const;
  /** A label beside a run, on one side of it, anchored so it reads away from the line. */
  const side = (p: Placed, x: number, y: number, sign: 1 | -1) => {
    const px = sign * p.dy, py = -sign * p.dx;
    return { x: x + px * stroke * 10, y: y + py * stroke * 10 + stroke * 4, textAnchor: px < -0.3 ? 'end' : px > 0.3 ? 'start' : 'middle' } as const;
  };

  return (
    <figure className="rounded-md border border-galv-200 bg-white p-2" aria-label="Plan sketch of the runs, drawn to scale">
      <svg viewBox={`${x0} ${y0} ${w} ${h}`} className="h-auto w-full" role="img" data-testid="plan-sketch">
        <title>Plan of the runs to scale</title>
        {placed.map((p, i) => {
          const runGates = gates.map((g, gi) => ({ g, gi })).filter(({ g }) => g.runIndex === i);
          const segs = takeoff?.runs[i]?.segments ?? [{ fromFt: 0, toFt: p.run.lengthFt, lengthFt: p.run.lengthFt, bays: 1, bayFt: p.run.lengthFt }];
          const [ex, ey] = at(p, p.run.lengthFt);
          const [mx, my] = at(p, p.run.lengthFt / 2);
          return (
            <g key={i}>
              <line x1={p.x0} y1={p.y0} x2={ex} y2={ey} stroke="#cbd4da" strokeWidth={stroke * 2} strokeLinecap="round" />
              {segs.map((s, k) => {
                const [sx, sy] = at(p, s.fromFt);
                const [tx, ty] = at(p, s.toFt);
                return (
                  <g key={k}>
                    <line x1={sx} y1={sy} x2={tx} y2={ty} stroke="#7c4728" strokeWidth={stroke * 2.5} />
                    {Array.from({ length: s.bays + 1 }, (_, b) => {
                      const [px, py] = at(p, s.fromFt + b * s.bayFt);
                      return <rect key={b} x={px - stroke * 2} y={py - stroke * 2} width={stroke * 4} height={stroke * 4} fill="#3e4a53" />;
                    })}
                  </g>
                );
              })}
              {runGates.map(({ g, gi }) => {
                const from = g.offsetFt ?? (p.run.lengthFt - g.widthFt) / 2;
                const [gx, gy] = at(p, from);
                const [hx, hy] = at(p, from + g.widthFt);
                return (
                  <g key={`g${gi}`}>
                    <line x1={gx} y1={gy} x2={hx} y2={hy} stroke="#4f7a32" strokeWidth={stroke * 2} strokeDasharray={`${stroke * 4} ${stroke * 3}`} />
                    <text {...side(p, (gx + hx) / 2, (gy + hy) / 2, -1)} fontSize={stroke * 11} fill="#3e6127">gate {g.widthFt} ft</text>
                  </g>
                );
              })}
              <text {...side(p, mx, my, 1)} fontSize={stroke * 11} fill="#343e45">
                {p.run.label || `Run ${i + 1}`} · {p.run.lengthFt} ft
              </text>
            </g>
          );
        })}
        <g>
          <line x1={x0 + 2} y1={y0 + h - 2} x2={x0 + 2 + scaleFt} y2={y0 + h - 2} stroke="#1f262b" strokeWidth={stroke * 1.5} />
          <text x={x0 + 2 + scaleFt / 2} y={y0 + h - 2 - stroke * 4} fontSize={stroke * 10} textAnchor="middle" fill="#1f262b">{scaleFt} ft</text>
        </g>
      </svg>
      <figcaption className="text-xs text-galv-500">Drawn to scale. Squares are posts; dashed green is a gate opening.</figcaption>
    </figure>
  );
}
