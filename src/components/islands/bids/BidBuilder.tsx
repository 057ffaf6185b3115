import { useMemo, useState } from 'react';
import { bidInput, computeBid, DEFAULT_EXCLUSIONS, DEFAULT_TERMS, type BidInput } from '../../../lib/bids/schema';
import type { PriceItem, PricingSettings, LineOverride, PricedLine } from '../../../lib/pricing/price';
import { markupFromMargin, marginFromMarkup } from '../../../lib/pricing/money';
import { parseDollars, centsToDollars } from '../../../lib/pricing/pricebook';
import type { Recipe } from '../../../lib/takeoff/recipe';
import type { Rates } from '../../../lib/takeoff/rates';
import { LABOUR_TASK_LABELS } from '../../../lib/takeoff/rates';
import { YARD_LABELS, YARD_POSITIONS, type SiteRules, type YardPosition } from '../../../lib/takeoff/input';
import { COST_CATEGORIES, COST_CATEGORY_LABELS, type CostCategory } from '../../../lib/costs/categories';
import { formatFeetInches } from '../../../lib/units';
import { formatDate, formatMoney, formatPct } from '../../../lib/format';
import { fieldErrors } from '../../../lib/errors';
import { api } from '../ui/api';
import PlanSketch from './PlanSketch';
import { fenceSummary } from '../../../lib/bids/scope';

interface StyleOption { id: number; name: string; kind: string; recipe: Recipe }
interface Props {
  jobId: number;
  styles: StyleOption[];
  rates: Record<number, Rates>;
  site: SiteRules;
  pricing: PricingSettings;
  targetMarginPct: number;
  book: PriceItem[];
  initial: BidInput | null;
  defaultStyleId: number | null;
  nextVersionNo: number;
}

interface RunRow { label: string; lengthFt: string; heightIn: string; headingDeg: string; connectsToPrevious: boolean; yard: YardPosition }
interface GateRow { runIndex: string; widthFt: string; kind: 'single' | 'double'; offsetFt: string }
interface ExtraRow { category: CostCategory; description: string; amount: string }

const DIRECTIONS: [number, string][] = [[0, '→ right'], [90, '↑ up'], [180, '← left'], [270, '↓ down'], [45, '↗'], [135, '↖'], [225, '↙'], [315, '↘']];
const num = (s: string) => (s.trim() === '' ? Number.NaN : Number(s));
const q = (x: number, places = 2) => (Number.isInteger(x) ? String(x) : x.toFixed(places).replace(/\.?0+$/, ''));

function ErrorText({ id, text }: { id: string; text?: string }) {
  return text ? <p id={id} className="field-error" role="alert">{text}</p> : null;
}

/**
 * The estimator's bid builder: runs and gates in, takeoff, buy list, labour, rentals and
 * price out, recomputed in the browser on every keystroke with the same code the server
 * prices a saved version with.
 */
export default function BidBuilder(p: Props) {
  const start = p.initial;
  const [styleId, setStyleId] = useState<number>(start?.styleId ?? p.defaultStyleId ?? p.styles[0]?.id ?? 0);
  const styleHeight = (id: number) => String(p.styles.find((s) => s.id === id)?.recipe.heightMaxIn ?? 72);
  const [runs, setRuns] = useState<RunRow[]>(() =>
    start?.runs.map((r) => ({ label: r.label, lengthFt: String(r.lengthFt), heightIn: String(r.heightIn), headingDeg: String(r.headingDeg), connectsToPrevious: r.connectsToPrevious, yard: r.yard }))
    ?? [{ label: '', lengthFt: '', heightIn: styleHeight(styleId), headingDeg: '0', connectsToPrevious: false, yard: 'back' }]);
  const [gates, setGates] = useState<GateRow[]>(() => start?.gates.map((g) => ({ runIndex: String(g.runIndex), widthFt: String(g.widthFt), kind: g.kind, offsetFt: g.offsetFt == null ? '' : String(g.offsetFt) })) ?? []);
  const [closed, setClosed] = useState(start?.closed ?? false);
  const [extras, setExtras] = useState<ExtraRow[]>(() => start?.extras.map((e) => ({ category: e.category, description: e.description, amount: centsToDollars(e.amountCents) })) ?? []);
  const [overrides, setOverrides] = useState<LineOverride[]>(start?.overrides ?? []);
  const [mode, setMode] = useState<'margin' | 'markup'>(start?.target.mode ?? 'margin');
  const [pct, setPct] = useState(String(start?.target.pct ?? p.targetMarginPct));
  const [includeTax, setIncludeTax] = useState(start?.target.includeTax ?? true);
  const [title, setTitle] = useState(start?.title ?? '');
  const [scope, setScope] = useState(start?.scope ?? '');
  const [terms, setTerms] = useState(start?.terms ?? DEFAULT_TERMS);
  const [exclusions, setExclusions] = useState(start?.exclusions ?? DEFAULT_EXCLUSIONS);
  const [editing, setEditing] = useState<string | null>(null);
  const [saving, setSaving] = useState(false);
  const [saved, setSaved] = useState<{ id: number; versionNo: number; status: string } | null>(null);
  const [serverError, setServerError] = useState<string | null>(null);
  const [serverFields, setServerFields] = useState<Record<string, string>>({});

  const book = useMemo(() => new Map(p.book.map((b) => [b.sku, b])), [p.book]);
  const style = p.styles.find((s) => s.id === styleId);

  const raw = {
    styleId, title, scope, terms, exclusions, closed, overrides,
    runs: runs.map((r) => ({ label: r.label, lengthFt: num(r.lengthFt), heightIn: num(r.heightIn), headingDeg: Number(r.headingDeg), connectsToPrevious: r.connectsToPrevious, yard: r.yard })),
    gates: gates.map((g) => ({ runIndex: Number(g.runIndex), widthFt: num(g.widthFt), kind: g.kind, offsetFt: g.offsetFt.trim() === '' ? null : num(g.offsetFt) })),
    extras: extras.map((e) => ({ category: e.category, description: e.description, amountCents: parseDollars(e.amount) ?? Number.NaN })),
    target: { mode, pct: num(pct), includeTax },
  };
  const parsed = bidInput.safeParse(raw);
  const result = useMemo(() => {
    if (!parsed.success || !style) return null;
    return computeBid(parsed.data, style.recipe, p.rates[style.id], p.site, book, p.pricing);
  }, [JSON.stringify(raw), style, book]);
  const fields: Record<string, string> = { ...(parsed.success ? {} : fieldErrors(parsed.error.issues)), ...(result && 'ok' in result ? result.fields : {}), ...serverFields };
  const ok = result && !('ok' in result) ? result : null;
  const takeoff = ok?.takeoff ?? null;
  const pricing = ok?.pricing ?? null;

  // The scope carried over from the version this one started from is free text: once the
  // fence itself changes (style, length or gates), it may describe a different fence.
  const fenceOf = (sid: number, lengths: number[], gateCount: number) => fenceSummary(p.styles.find((x) => x.id === sid)?.name ?? 'another style', lengths, gateCount);
  const startFence = start ? fenceOf(start.styleId, start.runs.map((r) => r.lengthFt), start.gates.length) : null;
  const nowFence = fenceOf(styleId, raw.runs.map((r) => r.lengthFt), gates.length);
  const scopeStale = startFence !== null && scope.trim() !== '' && scope === start?.scope && startFence !== nowFence;

  const touch = () => { setSaved(null); setServerFields({}); setServerError(null); };
  const setRun = (i: number, patch: Partial<RunRow>) => { touch(); setRuns(runs.map((r, k) => (k === i ? { ...r, ...patch } : r))); };
  const addRun = () => {
    touch();
    const last = runs[runs.length - 1];
    setRuns([...runs, { label: '', lengthFt: '', heightIn: last?.heightIn ?? styleHeight(styleId), headingDeg: String(((Number(last?.headingDeg ?? 0) + 90) % 360)), connectsToPrevious: runs.length > 0, yard: last?.yard ?? 'back' }]);
  };
  const removeRun = (i: number) => {
    touch();
    setRuns(runs.filter((_, k) => k !== i).map((r, k) => (k === 0 ? { ...r, connectsToPrevious: false } : r)));
    setGates(gates.filter((g) => Number(g.runIndex) !== i).map((g) => (Number(g.runIndex) > i ? { ...g, runIndex: String(Number(g.runIndex) - 1) } : g)));
  };
  const setGate = (i: number, patch: Partial<GateRow>) => { touch(); setGates(gates.map((g, k) => (k === i ? { ...g, ...patch } : g))); };
  const setExtra = (i: number, patch: Partial<ExtraRow>) => { touch(); setExtras(extras.map((e, k) => (k === i ? { ...e, ...patch } : e))); };
  const overrideOf = (key: string) => overrides.find((o) => o.key === key);
  const setOverride = (key: string, patch: Partial<LineOverride>) => {
    touch();
    const cur = overrideOf(key) ?? { key, qty: null, unitCostCents: null, note: '' };
    setOverrides([...overrides.filter((o) => o.key !== key), { ...cur, ...patch }]);
  };
  const clearOverride = (key: string) => { touch(); setOverrides(overrides.filter((o) => o.key !== key)); setEditing(null); };

  async function save() {
    if (!parsed.success || !ok) return;
    setSaving(true);
    const r = await api<{ id: number; versionNo: number; status: string }>(`/api/jobs/${p.jobId}/bids`, { body: parsed.data });
    setSaving(false);
    if (r.ok) { setSaved(r.data); setServerError(null); window.history.replaceState(null, '', `/jobs/${p.jobId}/bids/${r.data.id}`); }
    else { setServerError(r.error.message); setServerFields(r.error.fields ?? {}); }
  }
  async function setStatus(action: 'accept' | 'sent') {
    if (!saved) return;
    const r = action === 'accept'
      ? await api<{ status: string }>(`/api/jobs/${p.jobId}/bids/${saved.id}/accept`, { method: 'POST', body: {} })
      : await api<{ status: string }>(`/api/jobs/${p.jobId}/bids/${saved.id}`, { method: 'PATCH', body: { status: 'sent' } });
    if (r.ok) setSaved({ ...saved, status: r.data.status });
    else setServerError(r.error.message);
  }

  const runLabel = (i: number) => runs[i]?.label || `Run ${i + 1}`;
  const f = (k: string) => fields[k];
  const inputCls = (k: string) => `input ${f(k) ? 'input-error' : ''}`;
  const versionNo = saved?.versionNo ?? p.nextVersionNo;

  return (
    <div className="space-y-4" data-testid="bid-builder">
      <div className="grid gap-4 xl:grid-cols-5">
        <section className="card min-w-0 space-y-4 xl:col-span-3" aria-labelledby="geometry">
          <div className="flex flex-wrap items-end gap-3">
            <h2 id="geometry" className="mr-auto">Runs and gates</h2>
            <label className="min-w-[14rem]">
              <span className="label">Fence style</span>
              <select className={inputCls('styleId')} value={styleId} onChange={(e) => { touch(); setStyleId(Number(e.target.value)); }} aria-describedby={f('styleId') ? 'styleId-error' : undefined}>
                {p.styles.map((s) => <option key={s.id} value={s.id}>{s.name}</option>)}
              </select>
              <ErrorText id="styleId-error" text={f('styleId')} />
            </label>
          </div>
          {style && <p className="text-xs text-galv-600">{style.name}: {style.recipe.heightMinIn}–{style.recipe.heightMaxIn} in high, posts at most {style.recipe.spacingFt} ft on centre.</p>}
          <div className="overflow-x-auto">
            <table className="table-dense [&_td]:px-1.5 [&_th]:px-1.5" aria-label="Runs">
              <thead><tr><th>#</th><th>Name</th><th>Length ft</th><th>Height in</th><th>Direction</th><th title="Starts at the end of the run before, sharing its corner post">Corner</th><th>Yard</th><th /></tr></thead>
              <tbody>
                {runs.map((r, i) => (
                  <tr key={i}>
                    <td className="text-galv-500">{i + 1}</td>
                    <td><input className="input w-24" aria-label={`Run ${i + 1} name`} value={r.label} placeholder={`Run ${i + 1}`} onChange={(e) => setRun(i, { label: e.target.value })} /></td>
                    <td>
                      <input className={`${inputCls(`runs.${i}.lengthFt`)} w-20`} inputMode="decimal" aria-label={`Run ${i + 1} length in feet`} aria-invalid={Boolean(f(`runs.${i}.lengthFt`))} value={r.lengthFt} onChange={(e) => setRun(i, { lengthFt: e.target.value })} />
                      <ErrorText id={`runs.${i}.lengthFt-error`} text={f(`runs.${i}.lengthFt`)} />
                    </td>
                    <td>
                      <input className={`${inputCls(`runs.${i}.heightIn`)} w-16`} inputMode="decimal" aria-label={`Run ${i + 1} height in inches`} aria-invalid={Boolean(f(`runs.${i}.heightIn`))} value={r.heightIn} onChange={(e) => setRun(i, { heightIn: e.target.value })} />
                      <ErrorText id={`runs.${i}.heightIn-error`} text={f(`runs.${i}.heightIn`)} />
                    </td>
                    <td>
                      <select className="input w-24" aria-label={`Run ${i + 1} direction`} value={r.headingDeg} onChange={(e) => setRun(i, { headingDeg: e.target.value })}>
                        {DIRECTIONS.map(([d, l]) => <option key={d} value={d}>{l}</option>)}
                      </select>
                    </td>
                    <td className="text-center">
                      <input type="checkbox" aria-label={`Run ${i + 1} joins the run before at a shared corner post`} disabled={i === 0} checked={r.connectsToPrevious} onChange={(e) => setRun(i, { connectsToPrevious: e.target.checked })} />
                    </td>
                    <td>
                      <select className="input w-24" aria-label={`Run ${i + 1} yard`} value={r.yard} onChange={(e) => setRun(i, { yard: e.target.value as YardPosition })}>
                        {YARD_POSITIONS.map((y) => <option key={y} value={y}>{YARD_LABELS[y].replace(' yard', '')}</option>)}
                      </select>
                    </td>
                    <td>{runs.length > 1 && <button type="button" className="text-xs text-rust-700 underline" onClick={() => removeRun(i)}>Remove</button>}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
          <div className="flex flex-wrap items-center gap-3">
            <button type="button" className="btn-secondary" onClick={addRun}>Add a run</button>
            <button type="button" className="btn-secondary" onClick={() => { touch(); setGates([...gates, { runIndex: String(runs.length - 1), widthFt: '4', kind: 'single', offsetFt: '' }]); }}>Add a gate</button>
            <label className="flex items-center gap-2 text-sm"><input type="checkbox" checked={closed} onChange={(e) => { touch(); setClosed(e.target.checked); }} /> The last run closes on the first (an enclosure)</label>
          </div>
          <ErrorText id="closed-error" text={f('closed') ?? f('runs')} />
          {gates.length > 0 && (
            <div className="overflow-x-auto">
              <table className="table-dense [&_td]:px-1.5 [&_th]:px-1.5" aria-label="Gates">
                <thead><tr><th>Gate</th><th>In run</th><th>Width (ft)</th><th>Kind</th><th>From the run's start (ft)</th><th /></tr></thead>
                <tbody>
                  {gates.map((g, i) => (
                    <tr key={i}>
                      <td className="text-galv-500">{i + 1}</td>
                      <td>
                        <select className={`${inputCls(`gates.${i}.runIndex`)} w-32`} aria-label={`Gate ${i + 1} run`} value={g.runIndex} onChange={(e) => setGate(i, { runIndex: e.target.value })}>
                          {runs.map((_, k) => <option key={k} value={k}>{runLabel(k)}</option>)}
                        </select>
                        <ErrorText id={`gates.${i}.runIndex-error`} text={f(`gates.${i}.runIndex`)} />
                      </td>
                      <td>
                        <input className={`${inputCls(`gates.${i}.widthFt`)} w-20`} inputMode="decimal" aria-label={`Gate ${i + 1} width in feet`} value={g.widthFt} onChange={(e) => setGate(i, { widthFt: e.target.value })} />
                        <ErrorText id={`gates.${i}.widthFt-error`} text={f(`gates.${i}.widthFt`)} />
                      </td>
                      <td>
                        <select className={`${inputCls(`gates.${i}.kind`)} w-28`} aria-label={`Gate ${i + 1} kind`} value={g.kind} onChange={(e) => setGate(i, { kind: e.target.value as GateRow['kind'] })}>
                          <option value="single">Single</option><option value="double">Double</option>
                        </select>
                        <ErrorText id={`gates.${i}.kind-error`} text={f(`gates.${i}.kind`)} />
                      </td>
                      <td>
                        <input className={`${inputCls(`gates.${i}.offsetFt`)} w-24`} inputMode="decimal" placeholder="centred" aria-label={`Gate ${i + 1} distance from the run's start in feet`} value={g.offsetFt} onChange={(e) => setGate(i, { offsetFt: e.target.value })} />
                        <ErrorText id={`gates.${i}.offsetFt-error`} text={f(`gates.${i}.offsetFt`)} />
                      </td>
                      <td><button type="button" className="text-xs text-rust-700 underline" onClick={() => { touch(); setGates(gates.filter((_, k) => k !== i)); }}>Remove</button></td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
          )}
          <PlanSketch runs={parsed.success ? parsed.data.runs : []} gates={parsed.success && takeoff ? parsed.data.gates : []} takeoff={takeoff} />
        </section>

        <section className="card min-w-0 space-y-3 xl:col-span-2" aria-labelledby="takeoff-h" aria-live="polite">
          <h2 id="takeoff-h">Takeoff</h2>
          {!takeoff && (
            <p className="text-sm text-galv-600" data-testid="takeoff-waiting">
              {Object.keys(fields).length ? 'Fix the marked fields; the takeoff and the price follow as soon as they are right.' : 'Enter a length and a height for each run to see the takeoff.'}
            </p>
          )}
          {takeoff && (
            <dl className="grid grid-cols-2 gap-x-4 gap-y-1 text-sm" data-testid="takeoff-summary">
              <dt className="text-galv-500">Fence</dt><dd data-testid="takeoff-fence">{q(takeoff.fenceFt)} ft in {takeoff.bays} bays</dd>
              <dt className="text-galv-500">Posts</dt>
              <dd data-testid="takeoff-posts">{takeoff.posts.total} ({takeoff.posts.end} end, {takeoff.posts.corner} corner, {takeoff.posts.line} line, {takeoff.posts.gate} gate)</dd>
              <dt className="text-galv-500">Gates</dt><dd data-testid="takeoff-gates">{takeoff.gates.single} single, {takeoff.gates.double} double</dd>
              {takeoff.postGroups.slice(0, 3).map((g, i) => (
                <div key={i} className="contents">
                  <dt className="text-galv-500">{g.kind} posts, {g.heightIn} in</dt>
                  <dd>{formatFeetInches(g.lengthIn)} long, {formatFeetInches(g.embedmentIn)} in the ground; {g.holeDiameterIn} in hole {formatFeetInches(g.holeDepthIn)} deep</dd>
                </div>
              ))}
              {takeoff.concrete && <><dt className="text-galv-500">Concrete</dt><dd data-testid="takeoff-concrete">{q(takeoff.concrete.cuFt, 2)} ft³ → {takeoff.concrete.bags} × {takeoff.concrete.bagLb} lb bags</dd></>}
              {takeoff.gravel && <><dt className="text-galv-500">Gravel</dt><dd>{q(takeoff.gravel.cuFt, 2)} ft³ → {takeoff.gravel.bags} bags</dd></>}
              <dt className="text-galv-500">Lumber</dt><dd>{q(takeoff.materials.reduce((a, m) => a + (m.boardFeet ?? 0), 0), 1)} board ft</dd>
            </dl>
          )}
          {(takeoff?.warnings.length || pricing?.warnings.length) ? (
            <ul className="space-y-1 rounded-md border border-timber-300 bg-timber-50 p-2 text-sm text-timber-900" aria-label="Warnings" data-testid="warnings">
              {[...(takeoff?.warnings ?? []), ...(pricing?.warnings ?? [])].map((w, i) => <li key={i}>⚠ {w}</li>)}
            </ul>
          ) : null}
          {pricing && (
            <div className="space-y-2 border-t border-galv-200 pt-3" data-testid="price-box">
              <h3 className="font-semibold">Price</h3>
              <div className="flex flex-wrap items-end gap-2">
                <label><span className="label">Price to a</span>
                  <select className="input" value={mode} onChange={(e) => { touch(); const m = e.target.value as 'margin' | 'markup'; const n = num(pct); if (Number.isFinite(n)) setPct(q(m === 'markup' ? markupFromMargin(n) : marginFromMarkup(n), 2)); setMode(m); }}>
                    <option value="margin">Target gross margin</option><option value="markup">Markup on cost</option>
                  </select>
                </label>
                <label><span className="label">%</span>
                  <input className={`${inputCls('target.pct')} w-24`} inputMode="decimal" aria-label={mode === 'margin' ? 'Target margin percent' : 'Markup percent'} value={pct} onChange={(e) => { touch(); setPct(e.target.value); }} />
                </label>
                <label className="flex items-center gap-1 pb-2 text-sm"><input type="checkbox" checked={includeTax} onChange={(e) => { touch(); setIncludeTax(e.target.checked); }} /> Sales tax</label>
              </div>
              <ErrorText id="target.pct-error" text={f('target.pct')} />
              <dl className="grid grid-cols-2 gap-x-4 gap-y-1 text-sm">
                <dt className="text-galv-500">Cost</dt><dd className="num" data-testid="cost-total">{formatMoney(pricing.costCents)}</dd>
                <dt className="text-galv-500">{mode === 'margin' ? `Cost ÷ (1 − ${q(pricing.target.pct)} %)` : `Cost × (1 + ${q(pricing.target.pct)} %)`}</dt><dd className="num">{formatMoney(pricing.exactPriceCents)}</dd>
                <dt className="font-semibold">Bid price (rounded to {formatMoney(p.pricing.bidRoundingCents)})</dt><dd className="num text-lg font-semibold" data-testid="bid-price">{formatMoney(pricing.priceCents)}</dd>
                <dt className="text-galv-500">Gross margin · markup</dt><dd className="num" data-testid="bid-margin">{formatPct(pricing.marginPct)} · {formatPct(pricing.markupPct)}</dd>
                {pricing.taxCents > 0 && <><dt className="text-galv-500">Sales tax {q(p.pricing.taxRatePct, 3)} % on {p.pricing.taxMode === 'materials' ? 'materials' : 'the price'}</dt><dd className="num">{formatMoney(pricing.taxCents)}</dd></>}
                <dt className="text-galv-500">Total with tax</dt><dd className="num" data-testid="bid-total">{formatMoney(pricing.totalCents)}</dd>
              </dl>
              <table className="table-dense" aria-label="Cost by category">
                <tbody>
                  {COST_CATEGORIES.filter((c) => pricing.costByCategory[c] !== 0).map((c) => (
                    <tr key={c}><td>{COST_CATEGORY_LABELS[c]}</td><td className="num" data-testid={`cost-${c}`}>{formatMoney(pricing.costByCategory[c])}</td></tr>
                  ))}
                </tbody>
              </table>
            </div>
          )}
        </section>
      </div>

      {pricing && takeoff && (
        <section className="card min-w-0 space-y-3" aria-labelledby="lines-h">
          <h2 id="lines-h">Buy list, labour and rentals</h2>
          <div className="overflow-x-auto">
            <table className="table-dense" data-testid="bid-lines">
              <thead><tr><th>Line</th><th className="num">Takeoff</th><th className="num">Waste</th><th className="num">Qty</th><th>Unit</th><th className="num">Unit cost</th><th className="num">Amount</th><th>Supplier · last seen</th><th /></tr></thead>
              <tbody>
                {(['material', 'labour', 'rental', 'extra'] as const).map((kind) => pricing.lines.filter((l) => l.kind === kind).map((l) => (
                  <LineRow key={l.key} line={l} editing={editing === l.key} override={overrideOf(l.key)}
                    onEdit={() => setEditing(editing === l.key ? null : l.key)} onChange={(patch) => setOverride(l.key, patch)} onClear={() => clearOverride(l.key)} />
                )))}
              </tbody>
              <tfoot><tr><th colSpan={6}>Cost</th><th className="num">{formatMoney(pricing.costCents)}</th><th colSpan={2} /></tr></tfoot>
            </table>
          </div>
          <p className="text-xs text-galv-500">Takeoff is what the geometry needs; Qty is what to buy after waste, in whole units. “Adjust” overrides a line; the original stays beside it.</p>
          <div className="grid gap-4 lg:grid-cols-2">
            <div>
              <h3 className="mb-1 font-semibold">Cut list (stock lengths, saw kerf {takeoff && style ? `${style.recipe.kerfIn} in` : ''})</h3>
              <table className="table-dense" data-testid="cut-list">
                <thead><tr><th>Boards</th><th>Cut into</th><th className="num">Offcut</th></tr></thead>
                <tbody>
                  {takeoff.cutList.map((c, i) => (
                    <tr key={i}><td>{c.count} × {c.label} {c.stockFt} ft</td><td>{c.pieces.map((x) => formatFeetInches(x)).join(' + ')}</td><td className="num">{formatFeetInches(c.offcutIn)}</td></tr>
                  ))}
                  {!takeoff.cutList.length && <tr><td colSpan={3} className="text-galv-500">Nothing to cut for this style.</td></tr>}
                </tbody>
              </table>
            </div>
            <div>
              <h3 className="mb-1 font-semibold">Labour and rentals</h3>
              <table className="table-dense" data-testid="labour">
                <thead><tr><th>Task</th><th className="num">Crew-h</th><th className="num">Person-h</th></tr></thead>
                <tbody>
                  {takeoff.labour.map((l) => <tr key={l.task}><td>{LABOUR_TASK_LABELS[l.task]}</td><td className="num">{q(l.crewHours)}</td><td className="num">{q(l.manHours)}</td></tr>)}
                  <tr><th>Total</th><th className="num">{q(takeoff.labour.reduce((a, l) => a + l.crewHours, 0))}</th><th className="num" data-testid="labour-hours">{q(takeoff.labour.reduce((a, l) => a + l.manHours, 0))}</th></tr>
                  {takeoff.rentals.map((r) => (
                    <tr key={r.daySku}><td>{r.label} for {q(r.coversHours)} crew-h of digging</td><td colSpan={2} className="num" data-testid="rental-days">{r.days} day{r.days === 1 ? '' : 's'}{r.halfDays ? ' (half-day rate)' : ''}</td></tr>
                  ))}
                </tbody>
              </table>
            </div>
          </div>
        </section>
      )}

      <section className="card space-y-3" aria-labelledby="extras-h">
        <h2 id="extras-h">Permits, disposal and other lines</h2>
        {extras.map((e, i) => (
          <div key={i} className="flex flex-wrap items-start gap-2">
            <select className="input w-44" aria-label={`Line ${i + 1} category`} value={e.category} onChange={(ev) => setExtra(i, { category: ev.target.value as CostCategory })}>
              {COST_CATEGORIES.map((c) => <option key={c} value={c}>{COST_CATEGORY_LABELS[c]}</option>)}
            </select>
            <div className="min-w-[12rem] flex-1">
              <input className={inputCls(`extras.${i}.description`)} aria-label={`Line ${i + 1} description`} value={e.description} placeholder="e.g. Fence permit" onChange={(ev) => setExtra(i, { description: ev.target.value })} />
              <ErrorText id={`extras.${i}.description-error`} text={f(`extras.${i}.description`)} />
            </div>
            <div>
              <input className={`${inputCls(`extras.${i}.amountCents`)} w-28`} inputMode="decimal" aria-label={`Line ${i + 1} amount in dollars`} value={e.amount} placeholder="0.00" onChange={(ev) => setExtra(i, { amount: ev.target.value })} />
              <ErrorText id={`extras.${i}.amountCents-error`} text={f(`extras.${i}.amountCents`) ? 'Enter an amount such as 75.00.' : undefined} />
            </div>
            <button type="button" className="pt-2 text-xs text-rust-700 underline" onClick={() => { touch(); setExtras(extras.filter((_, k) => k !== i)); }}>Remove</button>
          </div>
        ))}
        <button type="button" className="btn-secondary" onClick={() => { touch(); setExtras([...extras, { category: 'permit', description: '', amount: '' }]); }}>Add a line</button>
      </section>

      <section className="card grid gap-4 md:grid-cols-2" aria-labelledby="words-h">
        <h2 id="words-h" className="md:col-span-2">What the customer reads</h2>
        <label className="md:col-span-2"><span className="label">Title</span><input className="input" value={title} placeholder="e.g. Back yard privacy fence" onChange={(e) => { touch(); setTitle(e.target.value); }} /></label>
        <div className="md:col-span-2">
          <label><span className="label">Scope of work</span><textarea className="input" rows={3} value={scope} placeholder="What we supply and install." aria-describedby={scopeStale ? 'scope-stale' : undefined} onChange={(e) => { touch(); setScope(e.target.value); }} /></label>
          {scopeStale && (
            <p id="scope-stale" className="mt-1 rounded-md bg-timber-50 px-3 py-2 text-sm text-timber-800" data-testid="scope-stale">
              This scope was written for the earlier version ({startFence}); the fence is now {nowFence}. Read it again before the customer does,{' '}
              <button type="button" className="underline" onClick={() => { touch(); setScope(''); }}>or clear it</button> and let the printed bid describe the fence from the takeoff.
            </p>
          )}
        </div>
        <label><span className="label">Terms</span><textarea className="input" rows={4} value={terms} onChange={(e) => { touch(); setTerms(e.target.value); }} /></label>
        <label><span className="label">Not included</span><textarea className="input" rows={4} value={exclusions} onChange={(e) => { touch(); setExclusions(e.target.value); }} /></label>
      </section>

      <div className="sticky bottom-0 z-10 flex flex-wrap items-center gap-3 border-t border-timber-200 bg-white/95 px-4 py-3 shadow-md">
        {pricing && <span className="font-semibold">Bid {formatMoney(pricing.priceCents)} <span className="text-sm font-normal text-galv-600">· margin {formatPct(pricing.marginPct)}</span></span>}
        <span className="mr-auto" />
        {serverError && <p role="alert" className="field-error">{serverError}</p>}
        {!saved && <button type="button" className="btn-primary" disabled={!ok || saving} onClick={save}>{saving ? 'Saving…' : `Save as version ${versionNo}`}</button>}
        {saved && (
          <>
            <span role="status" className="rounded-md bg-moss-100 px-3 py-1 text-sm text-moss-700" data-testid="saved-status">Version {saved.versionNo} saved · {saved.status}</span>
            <a className="btn-secondary" href={`/jobs/${p.jobId}/bids/${saved.id}/print`}>Printable bid</a>
            {saved.status === 'draft' && <button type="button" className="btn-secondary" onClick={() => setStatus('sent')}>Mark sent</button>}
            {saved.status !== 'accepted' && <button type="button" className="btn-primary" onClick={() => setStatus('accept')}>Accept version {saved.versionNo}</button>}
            {saved.status === 'accepted' && <a className="btn-primary" href={`/jobs/${p.jobId}`}>Back to the job</a>}
          </>
        )}
      </div>
    </div>
  );
}

function LineRow({ line: l, editing, override, onEdit, onChange, onClear }: {
  line: PricedLine; editing: boolean; override?: LineOverride;
  onEdit: () => void; onChange: (p: Partial<LineOverride>) => void; onClear: () => void;
}) {
  const [cost, setCost] = useState(override?.unitCostCents != null ? centsToDollars(override.unitCostCents) : '');
  return (
    <>
      <tr className={!l.priced ? 'bg-rust-100' : l.overridden ? 'bg-timber-50' : ''}>
        <td>
          {l.description}
          {l.sku && <span className="ml-1 text-xs text-galv-500">{l.sku}</span>}
          {l.overridden && <span className="pill ml-2 bg-timber-200 text-timber-900" title={l.note}>adjusted</span>}
          {!l.priced && <span className="pill ml-2 bg-rust-100 text-rust-700">no price</span>}
          {l.detail && <span className="block text-xs text-galv-500">{l.detail}</span>}
        </td>
        <td className="num">{l.takeoffQty != null ? q(l.takeoffQty) : ''}</td>
        <td className="num">{l.wastePct != null ? `${q(l.wastePct)} %` : ''}</td>
        <td className="num">{q(l.qty)}{l.original && l.original.qty !== l.qty && <span className="block text-xs text-galv-500 line-through">{q(l.original.qty)}</span>}</td>
        <td>{l.unit}</td>
        <td className="num">{formatMoney(l.unitCostCents)}{l.original && l.original.unitCostCents !== l.unitCostCents && <span className="block text-xs text-galv-500 line-through">{formatMoney(l.original.unitCostCents)}</span>}</td>
        <td className="num">{formatMoney(l.amountCents)}</td>
        <td className="text-xs text-galv-600">{l.supplierName ?? ''}{l.lastSeenOn ? ` · ${formatDate(l.lastSeenOn)}` : ''}</td>
        <td>{l.kind !== 'extra' && <button type="button" className="text-xs underline" onClick={onEdit} aria-expanded={editing}>Adjust</button>}</td>
      </tr>
      {editing && (
        <tr>
          <td colSpan={9} className="bg-timber-50">
            <div className="flex flex-wrap items-end gap-2">
              <label><span className="label">Quantity</span><input className="input w-24" inputMode="decimal" defaultValue={override?.qty ?? ''} placeholder={q(l.original?.qty ?? l.qty)} onChange={(e) => { const v = e.target.value.trim(); const n = Number(v); onChange({ qty: v === '' || !Number.isFinite(n) || n < 0 ? null : n }); }} /></label>
              <label><span className="label">Unit cost ($)</span><input className="input w-28" inputMode="decimal" value={cost} placeholder={centsToDollars(l.original?.unitCostCents ?? l.unitCostCents)} onChange={(e) => { setCost(e.target.value); onChange({ unitCostCents: e.target.value.trim() === '' ? null : parseDollars(e.target.value) }); }} /></label>
              <label className="min-w-[12rem] flex-1"><span className="label">Why</span><input className="input" defaultValue={override?.note ?? ''} placeholder="e.g. pallet price from the yard" onChange={(e) => onChange({ note: e.target.value })} /></label>
              <button type="button" className="btn-secondary" onClick={onClear}>Back to the takeoff</button>
            </div>
          </td>
        </tr>
      )}
    </>
  );
}
