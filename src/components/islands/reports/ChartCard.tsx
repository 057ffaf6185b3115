import type { ReactNode } from 'react';

/** A chart with the table of its numbers beside it (below it on a phone); `wideTable` gives the table the larger share. */
export function ChartCard({ id, title, note, chart, table, wideTable }: { id: string; title: string; note?: ReactNode; chart: ReactNode; table: ReactNode; wideTable?: boolean }) {
  return (
    <section className="card" aria-labelledby={`${id}-title`} data-testid={id}>
      <h2 id={`${id}-title`} className="mb-1">{title}</h2>
      {note && <p className="mb-3 text-sm text-galv-600">{note}</p>}
      <div className="grid gap-4 xl:grid-cols-5">
        <div className={`relative h-72 ${wideTable ? 'xl:col-span-2' : 'xl:col-span-3'}`} data-testid={`${id}-chart`}>{chart}</div>
        <Scroll label={`${title}: the numbers`} className={`max-h-80 overflow-auto ${wideTable ? 'xl:col-span-3' : 'xl:col-span-2'}`} testId={`${id}-table`}>{table}</Scroll>
      </div>
    </section>
  );
}

/** A region that scrolls: focusable, so the keyboard can scroll it too, and named. */
export function Scroll({ label, className = 'overflow-x-auto', testId, children }: { label: string; className?: string; testId?: string; children: ReactNode }) {
  return <div role="region" aria-label={label} tabIndex={0} className={`${className} [&_.num]:whitespace-nowrap`} data-testid={testId}>{children}</div>;
}
