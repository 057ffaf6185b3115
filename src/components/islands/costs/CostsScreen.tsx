import { useState } from 'react';
import CostsTable, { type CostFilters } from './CostsTable';
import ManualCostForm from './ManualCostForm';
import type { CostRow, CostTotals } from '../../../lib/costs/schema';
import type { JobOption } from './ui';

interface Props {
  initial: { items: CostRow[]; total: number; totals: CostTotals };
  initialFilters: CostFilters;
  jobs: JobOption[];
  suppliers: { id: number; name: string }[];
  mayWrite: boolean;
  today: string;
}

/** The company's costs table, with the form for costs that come without a receipt file. */
export default function CostsScreen({ mayWrite, today, ...table }: Props) {
  const [open, setOpen] = useState(false);
  const [reload, setReload] = useState(0);
  return (
    <div className="space-y-4">
      {mayWrite && (
        <section className="card">
          <div className="flex items-center justify-between gap-2">
            <h2>Other costs</h2>
            <button type="button" className="btn-secondary" aria-expanded={open} onClick={() => setOpen(!open)}>{open ? 'Close' : 'Add a permit, dump fee or subcontract'}</button>
          </div>
          {open && <div className="mt-3"><ManualCostForm jobs={table.jobs} suppliers={table.suppliers} today={today} presetJobId={table.initialFilters.job || null} onSaved={() => setReload((n) => n + 1)} /></div>}
        </section>
      )}
      <CostsTable {...table} reloadKey={reload} />
    </div>
  );
}
