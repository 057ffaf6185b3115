import { Fragment, useEffect, useRef, useState } from 'react';
import { COST_CATEGORIES, COST_CATEGORY_LABELS, type CostCategory } from '../../../lib/costs/categories';
import { centsToDollars, parseDollars, priceItemInput, type PriceBookItem } from '../../../lib/pricing/pricebook';
import type { PriceChange } from '../../../server/repos/pricebook';
import { formatDate, formatMoney } from '../../../lib/format';
import { api } from '../ui/api';
import { validate } from '../ui/form';

interface Props {
  initial: { items: PriceBookItem[]; total: number };
  changes: PriceChange[];
  canWrite: boolean;
  suppliers: string[];
}

type Sort = 'sku' | 'name' | 'category' | 'unit' | 'unitCost' | 'supplier' | 'lastSeen';
const COLS: [Sort, string, boolean][] = [['sku', 'Code', false], ['name', 'Item', false], ['category', 'Category', false], ['unit', 'Unit', false], ['unitCost', 'Unit cost', true], ['supplier', 'Supplier', false], ['lastSeen', 'Last seen', false]];
const PAGE = 50;

interface Draft { sku: string; name: string; category: CostCategory; unit: string; cost: string; supplierName: string; lastSeenOn: string; active: boolean }
const draftOf = (it?: PriceBookItem): Draft => ({
  sku: it?.sku ?? '', name: it?.name ?? '', category: it?.category ?? 'material', unit: it?.unit ?? 'each', cost: it ? centsToDollars(it.unitCostCents) : '',
  supplierName: it?.supplierName ?? '', lastSeenOn: it?.lastSeenOn ?? '', active: it?.active ?? true,
});

/** The price book: search, sort, edit in place, add, import and export CSV, and what changed. */
export default function PriceBookTable({ initial, changes: initialChanges, canWrite, suppliers }: Props) {
  const [data, setData] = useState(initial);
  const [q, setQ] = useState('');
  const [search, setSearch] = useState('');
  const [category, setCategory] = useState<'' | CostCategory>('');
  const [active, setActive] = useState<'active' | 'inactive' | 'all'>('active');
  const [sort, setSort] = useState<Sort>('sku');
  const [dir, setDir] = useState<'asc' | 'desc'>('asc');
  const [page, setPage] = useState(1);
  const [loading, setLoading] = useState(false);
  const [editId, setEditId] = useState<number | 'new' | null>(null);
  const [draft, setDraft] = useState<Draft>(draftOf());
  const [fields, setFields] = useState<Record<string, string>>({});
  const [error, setError] = useState<string | null>(null);
  const [notice, setNotice] = useState<string | null>(null);
  const [changes, setChanges] = useState(initialChanges);
  const [importing, setImporting] = useState<{ csv: string; name: string; preview: Record<string, number> | null; errors: Record<string, string> } | null>(null);
  const [reload, setReload] = useState(0);
  const first = useRef(true);

  useEffect(() => { const t = setTimeout(() => { setSearch(q); setPage(1); }, 250); return () => clearTimeout(t); }, [q]);
  useEffect(() => {
    if (first.current) { first.current = false; return; }
    const params = new URLSearchParams({ sort, dir, page: String(page), pageSize: String(PAGE), active });
    if (search) params.set('q', search);
    if (category) params.set('category', category);
    const ctrl = new AbortController();
    setLoading(true);
    api<{ items: PriceBookItem[]; total: number }>(`/api/pricebook?${params}`, { signal: ctrl.signal }).then((r) => {
      setLoading(false);
      if (r.ok) setData(r.data); else setError(r.error.message);
    }).catch(() => {});
    return () => ctrl.abort();
  }, [search, category, active, sort, dir, page, reload]);

  const toggleSort = (s: Sort) => { if (s === sort) setDir(dir === 'asc' ? 'desc' : 'asc'); else { setSort(s); setDir('asc'); } setPage(1); };
  const startEdit = (it?: PriceBookItem) => { setEditId(it ? it.id : 'new'); setDraft(draftOf(it)); setFields({}); setError(null); };

  async function saveDraft() {
    const cents = parseDollars(draft.cost);
    const body = { sku: draft.sku, name: draft.name, category: draft.category, unit: draft.unit, unitCostCents: cents ?? Number.NaN, supplierName: draft.supplierName, lastSeenOn: draft.lastSeenOn, active: draft.active };
    const v = validate(priceItemInput, body);
    if (!v.ok) { setFields({ ...v.fields, ...(cents === null ? { unitCostCents: 'Enter a cost such as 12.34.' } : {}) }); return; }
    const r = editId === 'new' ? await api<PriceBookItem>('/api/pricebook', { body: v.data }) : await api<PriceBookItem>(`/api/pricebook/${editId}`, { method: 'PATCH', body: v.data });
    if (!r.ok) { setError(r.error.message); setFields(r.error.fields ?? {}); return; }
    setNotice(`${r.data.sku} saved at ${formatMoney(r.data.unitCostCents)} per ${r.data.unit}.`);
    setEditId(null);
    setReload((n) => n + 1);
  }

  async function readFile(file: File) {
    const csv = await file.text();
    const r = await api<Record<string, number>>('/api/pricebook/import', { body: { csv, dryRun: true, fileName: file.name } });
    setImporting({ csv, name: file.name, preview: r.ok ? r.data : null, errors: r.ok ? {} : { _: r.error.message, ...(r.error.fields ?? {}) } });
  }
  async function confirmImport() {
    if (!importing) return;
    const r = await api<Record<string, number>>('/api/pricebook/import', { body: { csv: importing.csv, dryRun: false, fileName: importing.name } });
    if (!r.ok) { setImporting({ ...importing, errors: { _: r.error.message, ...(r.error.fields ?? {}) } }); return; }
    setNotice(`Imported ${importing.name}: ${r.data.created} new, ${r.data.updated} updated (${r.data.priceChanges} price changes), ${r.data.unchanged} unchanged.`);
    setImporting(null);
    setReload((n) => n + 1);
    const c = await api<{ items: PriceChange[] }>('/api/pricebook/changes');
    if (c.ok) setChanges(c.data.items);
  }
  async function markSeen() {
    const r = await api('/api/pricebook/changes', { body: { ids: 'all' } });
    if (r.ok) setChanges([]);
  }

  const pages = Math.max(1, Math.ceil(data.total / PAGE));
  const d = (k: keyof Draft) => (e: { target: { value: string } }) => setDraft({ ...draft, [k]: e.target.value });
  const err = (k: string) => fields[k] ? <p className="field-error" role="alert">{fields[k]}</p> : null;
  const editRow = (
    <tr className="bg-timber-50" data-testid="pricebook-edit-row">
      <td><input className="input w-32" aria-label="Item code" value={draft.sku} onChange={d('sku')} />{err('sku')}</td>
      <td><input className="input min-w-[12rem]" aria-label="Item name" value={draft.name} onChange={d('name')} />{err('name')}</td>
      <td><select className="input" aria-label="Category" value={draft.category} onChange={d('category')}>{COST_CATEGORIES.map((c) => <option key={c} value={c}>{COST_CATEGORY_LABELS[c]}</option>)}</select></td>
      <td><input className="input w-20" aria-label="Unit" value={draft.unit} onChange={d('unit')} />{err('unit')}</td>
      <td><input className="input w-24 text-right" aria-label="Unit cost in dollars" inputMode="decimal" value={draft.cost} onChange={d('cost')} />{err('unitCostCents')}</td>
      <td><input className="input w-40" aria-label="Supplier" list="suppliers" value={draft.supplierName} onChange={d('supplierName')} /></td>
      <td><input className="input w-36" type="date" aria-label="Last seen on" value={draft.lastSeenOn} onChange={d('lastSeenOn')} />{err('lastSeenOn')}</td>
      <td className="whitespace-nowrap">
        <label className="mr-2 text-xs"><input type="checkbox" checked={draft.active} onChange={(e) => setDraft({ ...draft, active: e.target.checked })} /> active</label>
        <button type="button" className="btn-primary px-2 py-1" onClick={saveDraft}>Save</button>
        <button type="button" className="ml-1 text-xs underline" onClick={() => setEditId(null)}>Cancel</button>
      </td>
    </tr>
  );

  return (
    <div className="space-y-4">
      {changes.length > 0 && (
        <section className="card border-timber-400" aria-labelledby="changes-h" data-testid="price-changes">
          <div className="mb-2 flex flex-wrap items-center gap-3">
            <h2 id="changes-h" className="mr-auto">What changed since you last looked ({changes.length})</h2>
            {canWrite && <button type="button" className="btn-secondary" onClick={markSeen}>Mark all as seen</button>}
          </div>
          <div className="overflow-x-auto">
            <table className="table-dense">
              <thead><tr><th>Item</th><th className="num">Was</th><th className="num">Now</th><th className="num">Change</th><th>From</th><th>When</th></tr></thead>
              <tbody>
                {changes.map((c) => {
                  const pct = c.oldUnitCostCents ? ((c.newUnitCostCents - c.oldUnitCostCents) / c.oldUnitCostCents) * 100 : null;
                  return (
                    <tr key={c.id}>
                      <td>{c.name} <span className="text-xs text-galv-500">{c.sku}</span></td>
                      <td className="num">{c.oldUnitCostCents === null ? 'new' : formatMoney(c.oldUnitCostCents)}</td>
                      <td className="num">{formatMoney(c.newUnitCostCents)}</td>
                      <td className={`num ${pct !== null && pct > 0 ? 'text-rust-700' : 'text-moss-700'}`}>{pct === null ? '' : `${pct > 0 ? '+' : ''}${pct.toFixed(1)} %`}</td>
                      <td className="text-xs">{c.source === 'receipt' ? 'a receipt' : c.source === 'csv_import' ? `import ${c.sourceRef ?? ''}` : 'edited'}{c.supplierName ? ` · ${c.supplierName}` : ''}{c.changedByName ? ` · ${c.changedByName}` : ''}</td>
                      <td className="whitespace-nowrap text-xs">{formatDate(c.createdAt)}</td>
                    </tr>
                  );
                })}
              </tbody>
            </table>
          </div>
        </section>
      )}

      {notice && <p role="status" className="rounded-md bg-moss-100 px-3 py-2 text-sm text-moss-700">{notice}</p>}
      {error && <p role="alert" className="field-error">{error}</p>}

      <div className="flex flex-wrap items-end gap-3">
        <label className="min-w-[14rem] flex-1"><span className="label">Search</span>
          <input className="input" type="search" placeholder="Item code, name or supplier" value={q} onChange={(e) => setQ(e.target.value)} />
        </label>
        <label><span className="label">Category</span>
          <select className="input" value={category} onChange={(e) => { setCategory(e.target.value as CostCategory | ''); setPage(1); }}>
            <option value="">All</option>{COST_CATEGORIES.map((c) => <option key={c} value={c}>{COST_CATEGORY_LABELS[c]}</option>)}
          </select>
        </label>
        <label><span className="label">Show</span>
          <select className="input" value={active} onChange={(e) => { setActive(e.target.value as typeof active); setPage(1); }}>
            <option value="active">Active items</option><option value="inactive">Inactive items</option><option value="all">All items</option>
          </select>
        </label>
        <a className="btn-secondary" href="/api/pricebook/export" download>Export CSV</a>
        {canWrite && (
          <>
            <label className="btn-secondary cursor-pointer">Import CSV<input type="file" accept=".csv,text/csv" className="sr-only" onChange={(e) => { const f = e.target.files?.[0]; if (f) readFile(f); e.target.value = ''; }} /></label>
            <button type="button" className="btn-primary" onClick={() => startEdit()}>Add an item</button>
          </>
        )}
      </div>

      {importing && (
        <div className="card space-y-2" role="region" aria-label="Import preview">
          <p className="font-semibold">Import {importing.name}</p>
          {importing.preview && <p className="text-sm">{importing.preview.rows} rows: {importing.preview.created} new, {importing.preview.updated} updated ({importing.preview.priceChanges} price changes), {importing.preview.unchanged} unchanged.</p>}
          {Object.keys(importing.errors).length > 0 && (
            <ul className="max-h-48 overflow-auto text-sm text-rust-700" role="alert">{Object.entries(importing.errors).slice(0, 30).map(([k, m]) => <li key={k}>{m}</li>)}</ul>
          )}
          <div className="flex gap-2">
            {importing.preview && <button type="button" className="btn-primary" onClick={confirmImport}>Import these rows</button>}
            <button type="button" className="btn-secondary" onClick={() => setImporting(null)}>Cancel</button>
          </div>
          <p className="text-xs text-galv-500">Columns: sku, name, category, unit, unit_cost, supplier, last_seen_on, active, notes. Rows match by sku; nothing is saved if any row is wrong.</p>
        </div>
      )}

      <datalist id="suppliers">{suppliers.map((s) => <option key={s} value={s} />)}</datalist>
      <div className="overflow-x-auto rounded-lg border border-galv-200 bg-white">
        <table className="table-dense" aria-busy={loading} data-testid="pricebook-table">
          <thead>
            <tr>
              {COLS.map(([key, label, right]) => (
                <th key={key} aria-sort={sort === key ? (dir === 'asc' ? 'ascending' : 'descending') : 'none'} className={right ? 'num' : ''}>
                  <button type="button" className="flex items-center gap-1" onClick={() => toggleSort(key)}>{label}<span aria-hidden="true" className="text-galv-400">{sort === key ? (dir === 'asc' ? '▲' : '▼') : '↕'}</span></button>
                </th>
              ))}
              <th />
            </tr>
          </thead>
          <tbody className={loading ? 'opacity-60' : ''}>
            {editId === 'new' && editRow}
            {data.items.map((it) => editId === it.id ? <Fragment key={it.id}>{editRow}</Fragment> : (
              <tr key={it.id} className={it.active ? '' : 'text-galv-400'}>
                <td className="whitespace-nowrap font-mono text-xs">{it.sku}</td>
                <td>{it.name}</td>
                <td>{COST_CATEGORY_LABELS[it.category]}</td>
                <td>{it.unit}</td>
                <td className="num">{formatMoney(it.unitCostCents)}</td>
                <td>{it.supplierName ?? '—'}</td>
                <td className="whitespace-nowrap">{formatDate(it.lastSeenOn)}</td>
                <td>{canWrite && <button type="button" className="text-xs underline" onClick={() => startEdit(it)}>Edit</button>}</td>
              </tr>
            ))}
            {data.items.length === 0 && <tr><td colSpan={8} className="text-center text-galv-500">No items match.</td></tr>}
          </tbody>
        </table>
      </div>
      <div className="flex items-center gap-3 text-sm">
        <span data-testid="pricebook-total">{data.total} item{data.total === 1 ? '' : 's'}</span>
        <span className="ml-auto" />
        <button type="button" className="btn-secondary" disabled={page <= 1} onClick={() => setPage(page - 1)}>Previous</button>
        <span>Page {page} of {pages}</span>
        <button type="button" className="btn-secondary" disabled={page >= pages} onClick={() => setPage(page + 1)}>Next</button>
      </div>
    </div>
  );
}
