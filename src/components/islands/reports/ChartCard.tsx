import type { ReactNode } from 'react';

/** A chart with the table of its numbers beside it (below it on a phone). */
export function ChartCard({ id, title, note, chart, table, wideTable }: { id: string; title: string; note?: ReactNode; chart: ReactNode; table: ReactNode; wideTable?: boolean }) {
  return (
    <section className="card" aria-labelledby={`${id}-title`} data-testid={id}>
      <h2 id={`${id}-title`} className="mb-1">{title}</h2>
      {note && <p className="mb-3 text-sm text-galv-600">{note}</p>}
      <div className={`grid gap-4 ${wideTable ? 'xl:grid-cols-2' : 'xl:grid-cols-5'}`}>
        <div className={`relative h-72 ${wideTable ? '' : 'xl:col-span-3'}`} data-testid={`${id}-chart`}>{chart}</div>
        <div className={`max-h-80 overflow-auto [&_.num]:whitespace-nowrap ${wideTable ? '' : 'xl:col-span-2'}`} data-testid={`${id}-table`}>{table}</div>
      </div>
    </section>
  );
}
