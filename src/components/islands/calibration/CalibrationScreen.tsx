import { Fragment, useMemo, useState } from 'react';
import { Bar } from 'react-chartjs-2';
import { COLOURS, baseOptions, fill } from '../reports/charts';
import { ChartCard, Scroll } from '../reports/ChartCard';
import { api } from '../ui/api';
import { formatDate, formatMoney, type CurrencyCode } from '../../../lib/format';
import { COST_GROUP_LABELS } from '../../../lib/margins/job';
import { RATE_INFO, type RateKind } from '../../../lib/takeoff/rates';
import { WASTE_LABELS, type CalibrationItem, type StyleCalibration } from '../../../lib/calibration/calibrate';
import type { UnitCostCheck } from '../../../lib/calibration/unit-costs';
import type { ErrorSummary } from '../../../lib/calibration/backtest';
import type { Application, Exclusion } from '../../../server/repos/calibration';
import type { RateVersion } from '../../../server/repos/rates';
import type { WasteVersion } from '../../../server/repos/waste-versions';
import type { WasteKey } from '../../../lib/takeoff/recipe';

export interface CalibrationData {
  currency: CurrencyCode;
  today: string;
  minJobs: number;
  halfLifeDays: number | null;
  styles: (StyleCalibration & { kind: string })[];
  withoutJobs: { styleId: number; styleName: string }[];
  unitCosts: UnitCostCheck[];
  exclusions: Exclusion[];
  applications: Application[];
  rateHistory: Record<string, RateVersion[]>;
  wasteHistory: Record<string, WasteVersion[]>;
}

const num = (v: number | null | undefined, d = 4) => (v === null || v === undefined ? '—' : Number(v.toFixed(d)).toString());
const err = (e: ErrorSummary | null | undefined) => (e ? `${e.mape.toFixed(1)} %` : '—');
const bias = (e: ErrorSummary | null | undefined) => (e ? `${e.bias > 0 ? '+' : ''}${e.bias.toFixed(1)} %${Math.abs(e.bias) >= 0.05 ? (e.bias < 0 ? ' (low)' : ' (high)') : ''}` : '—');
const ratio = (x: number | null | undefined) => (x === null || x === undefined ? '—' : `${x.toFixed(2)}×`);
const gain = (s: StyleCalibration) => (s.backtest ? s.backtest.current.mape - s.backtest.suggested.mape : 0);
const valueText = (item: CalibrationItem, v: number | null) => (v === null ? '—' : item.kind === 'waste' ? `${v.toFixed(1)} %` : item.kind === 'rental' ? `${v.toFixed(1)} h` : num(v));
const valuesText = (vals: Record<string, number> | null) =>
  vals ? Object.entries(vals).map(([k, v]) => (k in RATE_INFO ? `${RATE_INFO[k as RateKind].label} ${num(v)}` : `${WASTE_LABELS[k as WasteKey] ?? k} ${v} %`)).join(' · ') : '—';
const KIND_HEADINGS: Record<CalibrationItem['kind'], string> = { labour: 'Labour, crew-hours', waste: 'Materials bought over the takeoff', rental: 'Rental days of the digging equipment' };
/** An applied item's words: its label in the style's calibration, else the key read aloud. */
const itemLabel = (data: CalibrationData, styleId: number, key: string) =>
  data.styles.find((s) => s.styleId === styleId)?.items.find((i) => i.key === key)?.label
  ?? (key.startsWith('waste:') ? `${WASTE_LABELS[key.slice(6) as WasteKey] ?? key.slice(6)} waste` : key === 'rental:day_hours' ? 'Hours of digging a rental day covers' : key);
const ZERO_LINE = { color: (c: { tick?: { value: number } }) => (c.tick?.value === 0 ? COLOURS.steel : 'rgba(31,38,43,0.1)'), lineWidth: (c: { tick?: { value: number } }) => (c.tick?.value === 0 ? 2 : 1) };

/** The estimator's calibration: what finished jobs took against their bids, suggestions, backtests, apply. */
export default function CalibrationScreen({ initial, mayApply }: { initial: CalibrationData; mayApply: boolean }) {
  const [data, setData] = useState(initial);
  const [busy, setBusy] = useState(false);
  const [message, setMessage] = useState<{ style: number; text: string; ok: boolean } | null>(null);
  // The style whose suggestions would lower its error the most opens first.
  const [shown, setShown] = useState<number | null>(() => [...initial.styles].sort((a, b) => gain(b) - gain(a))[0]?.styleId ?? null);

  const reload = async (halfLife = data.halfLifeDays) => {
    const r = await api<CalibrationData>(`/api/calibration${halfLife ? `?halfLifeDays=${halfLife}` : ''}`);
    if (r.ok) setData(r.data);
  };

  const chartOf = (pick: (e: ErrorSummary) => number) => ({
    labels: data.styles.map((s) => s.styleName),
    datasets: [
      { label: "Today's rates (striped)", data: data.styles.map((s) => (s.backtest ? pick(s.backtest.current) : null)), backgroundColor: fill(COLOURS.galv, 'stripes'), borderColor: COLOURS.galv, borderWidth: 1 },
      { label: 'With the suggestions (solid)', data: data.styles.map((s) => (s.backtest ? pick(s.backtest.suggested) : null)), backgroundColor: fill(COLOURS.moss, 'solid'), borderColor: COLOURS.moss, borderWidth: 1 },
    ],
  });
  const chart = useMemo(() => chartOf((e) => e.mape), [data.styles]);
  const biasChart = useMemo(() => chartOf((e) => e.bias), [data.styles]);
  const m = (c: number | null | undefined) => formatMoney(c, data.currency);

  return (
    <div className="space-y-4" data-testid="calibration-screen">
      <section className="card text-sm" aria-labelledby="how-title">
        <h2 id="how-title" className="mb-1">How the suggestions are made</h2>
        <p className="max-w-4xl text-galv-700">
          For each labour task and material group, and for the hours of digging a rental day covers, every finished job with an accepted bid gives one
          achieved rate: crew-hours per hole, per foot of fence, per gate or per job; for materials, what was bought against the bid's own buy list,
          so a whole roll or box is not counted as waste; for rentals, the digging the job took ÷ the days of digging equipment it rented.
          The suggestion is the <strong>median</strong> of those rates: one job that hit a rock ledge hardly moves it, where it would drag a mean.
          Fewer than {data.minJobs} jobs give no suggestion. The <strong>backtest</strong> judges each job by a rate fitted on the other jobs only
          (leave one out) and reports the mean absolute error of the bids' cost against what the jobs cost, and its bias (negative: bids ran low).
        </p>
        <label className="mt-3 flex max-w-md items-center gap-2">
          <span className="whitespace-nowrap font-medium">Count jobs</span>
          <select className="input" value={data.halfLifeDays ?? ''} onChange={(e) => reload(e.target.value ? Number(e.target.value) : null)} aria-label="How jobs are weighted">
            <option value="">all alike (median)</option>
            <option value="180">recent ones more (half-life 180 days)</option>
            <option value="365">recent ones more (half-life a year)</option>
          </select>
        </label>
      </section>

      <ChartCard id="chart-backtest" wideTable title="Backtest: the bids' cost error by style" note="Mean absolute percentage error of each style's bids against its finished jobs, judged leave one out. Lower is better."
        chart={<Bar role="img" aria-label="Bar chart of each style's bid cost error with today's rates and with the suggested rates; the numbers are in the table beside it." data={chart} options={baseOptions<'bar'>({ scales: { y: { title: { display: true, text: 'Error, % of cost' }, beginAtZero: true } } })} />}
        table={
          <table className="table-dense" data-testid="backtest-table">
            <thead><tr><th>Style</th><th className="num">Jobs</th><th className="num">Error today</th><th className="num">With suggestions</th></tr></thead>
            <tbody>{data.styles.map((s) => <tr key={s.styleId} data-style={s.styleName}><td className="min-w-40"><button type="button" className="text-left text-timber-700 underline" onClick={() => setShown(s.styleId)}>{s.styleName}</button></td><td className="num">{s.backtest?.n ?? 0}</td><td className="num">{err(s.backtest?.current)}</td><td className="num">{err(s.backtest?.suggested)}</td></tr>)}</tbody>
          </table>
        } />

      <ChartCard id="chart-bias" wideTable title="Backtest: the bids' bias by style"
        note="Mean signed error of each style's bids against its finished jobs, judged leave one out: below the zero line the bids ran low (the jobs cost more), above it high. Closer to zero is better."
        chart={<Bar role="img" aria-label="Bar chart of each style's bid cost bias with today's rates and with the suggested rates, around a zero line; the numbers are in the table beside it." data={biasChart}
          options={baseOptions<'bar'>({ scales: { y: { title: { display: true, text: 'Bias, % of cost' }, grid: ZERO_LINE } } })} />}
        table={
          <table className="table-dense" data-testid="bias-table">
            <thead><tr><th>Style</th><th className="num">Jobs</th><th className="num">Bias today</th><th className="num">With suggestions</th></tr></thead>
            <tbody>{data.styles.map((s) => <tr key={s.styleId} data-style={s.styleName}><td className="min-w-40">{s.styleName}</td><td className="num">{s.backtest?.n ?? 0}</td><td className="num">{bias(s.backtest?.current)}</td><td className="num">{bias(s.backtest?.suggested)}</td></tr>)}</tbody>
          </table>
        } />

      <nav aria-label="Styles" className="flex flex-wrap gap-2" data-testid="style-tabs">
        {data.styles.map((s) => (
          <button key={s.styleId} type="button" aria-pressed={shown === s.styleId} onClick={() => setShown(s.styleId)}
            className={shown === s.styleId ? 'btn-primary' : 'btn-secondary'}>
            {s.styleName}{s.items.some((i) => i.applicable) ? ` · ${s.items.filter((i) => i.applicable).length} to apply` : ''}
          </button>
        ))}
      </nav>
      {data.styles.filter((s) => s.styleId === shown).map((s) => (
        <StyleSection key={s.styleId} style={s} data={data} money={m} mayApply={mayApply} busy={busy} message={message?.style === s.styleId ? message : null}
          onApply={async (items, reason) => {
            setBusy(true);
            const r = await api<CalibrationData & { applied: { key: string }[] }>('/api/calibration/apply', { body: { styleId: s.styleId, items, reason, halfLifeDays: data.halfLifeDays } });
            setBusy(false);
            if (r.ok) {
              setData(r.data);
              setMessage({ style: s.styleId, ok: true, text: `Applied ${r.data.applied.length} suggestion${r.data.applied.length === 1 ? '' : 's'} as new rate versions. New bids for ${s.styleName} use them; bids already saved keep the rates they were priced with.` });
            } else setMessage({ style: s.styleId, ok: false, text: r.error.fields ? `${r.error.message} ${Object.values(r.error.fields).join(' ')}` : r.error.message });
          }}
          onExclude={async (jobId, scope, reason) => {
            const r = await api('/api/calibration/exclusions', { body: { jobId, scope, reason } });
            if (!r.ok) return r.error.fields ? Object.values(r.error.fields).join(' ') : r.error.message;
            await reload();
            return null;
          }}
          onInclude={async (id) => { await api(`/api/calibration/exclusions/${id}`, { method: 'DELETE' }); await reload(); }} />
      ))}
      {data.withoutJobs.length > 0 && <p className="text-sm text-galv-600">No finished jobs yet for {data.withoutJobs.map((s) => s.styleName).join(', ')}: nothing to calibrate them from.</p>}

      <section className="card" aria-labelledby="unit-title">
        <h2 id="unit-title" className="mb-1">Material unit costs: paid against the bids and the price book</h2>
        <p className="mb-2 max-w-4xl text-sm text-galv-600">
          Each finished job that bought an item gives its paid unit cost (what its receipts paid ÷ the units). Where at least {data.minJobs} jobs bought it,
          the suggested book price is today's book price × the median of paid ÷ book. Receipts already update the price book as they come in; change a price
          there (<a href="/pricebook">price book</a>) if the suggestion says the book is off.
        </p>
        <Scroll label="Material unit costs" className="max-h-96 overflow-auto">
          <table className="table-dense" data-testid="unit-costs">
            <thead><tr><th>Item</th><th className="num">Jobs</th><th className="num">Bid (median)</th><th className="num">Paid (median)</th><th className="num">Paid ÷ bid</th><th className="num">Price book today</th><th className="num">Paid ÷ book (middle half)</th><th className="num">Suggested book price</th></tr></thead>
            <tbody>{data.unitCosts.map((u) => (
              <tr key={u.sku} data-sku={u.sku}>
                <td>{u.name} <span className="text-xs text-galv-500">{u.sku}</span></td><td className="num">{u.jobs}</td><td className="num">{m(u.bidMedianCents)}</td><td className="num">{m(u.paidMedianCents)}</td>
                <td className="num">{ratio(u.ratio.median)}</td><td className="num">{m(u.bookCents)}</td>
                <td className="num">{u.bookRatio ? `${ratio(u.bookRatio.median)} (${u.bookRatio.q1.toFixed(2)}–${u.bookRatio.q3.toFixed(2)})` : '—'}</td>
                <td className="num" data-testid={`unit-suggested-${u.sku}`}>{u.suggestedCents !== null ? <strong>{m(u.suggestedCents)}</strong> : <span className="whitespace-normal text-xs text-galv-600">{u.reason}</span>}</td>
              </tr>
            ))}</tbody>
          </table>
        </Scroll>
      </section>

      <section className="card" aria-labelledby="applied-title">
        <h2 id="applied-title" className="mb-2">Calibrations applied</h2>
        {data.applications.length === 0 ? <p className="text-sm text-galv-600">None yet.</p> : (
          <Scroll label="Calibrations applied">
            <table className="table-dense" data-testid="applications">
              <thead><tr><th>When</th><th>Who</th><th>Style</th><th>What</th><th>From</th><th>To</th><th className="num">Jobs</th><th className="num">Error</th><th>Why</th></tr></thead>
              <tbody>{data.applications.map((a) => <tr key={a.id}><td className="whitespace-nowrap">{formatDate(a.createdAt)}</td><td>{a.createdByName ?? '—'}</td><td>{a.styleName}</td><td>{itemLabel(data, a.styleId, a.itemKey)}</td><td>{valuesText(a.oldValues)}</td><td>{valuesText(a.newValues)}</td><td className="num">{a.jobs}</td><td className="num whitespace-nowrap">{a.mapeBefore.toFixed(1)} → {a.mapeAfter.toFixed(1)} %</td><td>{a.reason}</td></tr>)}</tbody>
            </table>
          </Scroll>
        )}
      </section>
    </div>
  );
}

function StyleSection({ style: s, data, money, mayApply, busy, message, onApply, onExclude, onInclude }: {
  style: StyleCalibration;
  data: CalibrationData;
  money: (cents: number | null | undefined) => string;
  mayApply: boolean;
  busy: boolean;
  message: { text: string; ok: boolean } | null;
  onApply: (items: { key: string; suggested: number }[], reason: string) => Promise<void>;
  onExclude: (jobId: number, scope: string, reason: string) => Promise<string | null>;
  onInclude: (id: number) => Promise<void>;
}) {
  const [chosen, setChosen] = useState<string[]>([]);
  const [reason, setReason] = useState('');
  const [open, setOpen] = useState<string | null>(null);
  const applicable = s.items.filter((i) => i.applicable);
  const bt = s.backtest;
  // Rate versions and waste versions together, newest first.
  const history = [
    ...(data.rateHistory[String(s.styleId)] ?? []).map((h) => ({ key: `r${h.id}`, at: h.createdAt, what: RATE_INFO[h.kind]?.label ?? h.kind, versionNo: h.versionNo, value: num(h.value), who: h.createdByName, reason: h.reason })),
    ...(data.wasteHistory[String(s.styleId)] ?? []).map((h) => ({ key: `w${h.id}`, at: h.createdAt, what: `${WASTE_LABELS[h.wasteKey] ?? h.wasteKey} waste`, versionNo: h.versionNo, value: `${h.oldPct === null ? '' : `${h.oldPct} → `}${h.newPct} %`, who: h.createdByName, reason: h.reason })),
  ].sort((a, b) => b.at.localeCompare(a.at) || b.key.localeCompare(a.key));
  const excl = (jobId: number, scope: string) => data.exclusions.find((e) => e.jobId === jobId && (e.scope === scope || e.scope === 'job'));
  return (
    <section id={`style-${s.styleId}`} className="card" aria-labelledby={`style-${s.styleId}-title`} data-testid={`calibration-style-${s.styleId}`} data-style={s.styleName}>
      <div className="mb-2 flex flex-wrap items-baseline justify-between gap-2">
        <h2 id={`style-${s.styleId}-title`}>{s.styleName}</h2>
        <span className="text-sm text-galv-600">{s.jobs} finished job{s.jobs === 1 ? '' : 's'}{s.excludedJobs ? `, ${s.excludedJobs} left out` : ''}</span>
      </div>
      {bt && (
        <p className="mb-3 text-sm" data-testid="style-summary">
          At today's rates these bids would have missed the jobs' cost by <strong>{err(bt.current)}</strong> on average, bias {bias(bt.current)}.
          {applicable.length ? <> With the {applicable.length} suggestion{applicable.length === 1 ? '' : 's'} marked below: <strong>{err(bt.suggested)}</strong>, bias {bias(bt.suggested)}.</> : ' No suggestion lowers that.'}
        </p>
      )}
      <Scroll label={`${s.styleName}: rates against the finished jobs`}>
        <table className="table-dense" data-testid="calibration-items">
          <thead><tr>{mayApply && <th><span className="sr-only">Apply</span></th>}<th>Rate</th><th className="num">Jobs</th><th className="num">Bid</th><th className="num">Actual</th><th className="num">Actual ÷ bid</th><th className="num">Today</th><th className="num">Suggested</th><th className="num">Error: today → suggested</th><th><span className="sr-only">Jobs behind it</span></th></tr></thead>
          <tbody>
            {s.items.map((it, i) => (
              <Fragment key={it.key}>
                {(i === 0 || s.items[i - 1].kind !== it.kind) && <tr><th colSpan={mayApply ? 10 : 9} scope="colgroup" className="bg-timber-50 text-timber-900">{KIND_HEADINGS[it.kind]}</th></tr>}
                <tr data-item={it.key}>
                  {mayApply && <td>{it.applicable && <input type="checkbox" aria-label={`Apply the suggested ${it.label.toLowerCase()}`} checked={chosen.includes(it.key)} onChange={(e) => setChosen(e.target.checked ? [...chosen, it.key] : chosen.filter((k) => k !== it.key))} />}</td>}
                  <td className="min-w-48"><span className="font-medium">{it.label}</span><span className="block text-xs text-galv-500">{it.unit}{it.kind === 'waste' && it.boughtToTakeoffMedian !== null ? `; bought ÷ takeoff ${ratio(it.boughtToTakeoffMedian)}` : ''}</span></td>
                  <td className="num">{it.n}</td>
                  <td className="num">{valueText(it, it.bidMedian)}</td>
                  <td className="num">{valueText(it, it.actualMedian)}</td>
                  <td className="num whitespace-nowrap">{it.ratio ? `${ratio(it.ratio.median)} (${it.ratio.q1.toFixed(2)}–${it.ratio.q3.toFixed(2)})` : '—'}</td>
                  <td className="num">{valueText(it, it.current)}</td>
                  <td className="num" data-testid={`suggested-${it.key}`}>
                    {it.suggested === null ? <span className="text-xs text-galv-600">{it.reason}</span> : <>{valueText(it, it.suggested)}{it.held && <span className="block text-xs text-timber-800">held at the recipe's limit</span>}</>}
                  </td>
                  <td className="num whitespace-nowrap" data-testid={`backtest-${it.key}`}>
                    {it.backtestNote && <span className="block max-w-56 whitespace-normal text-xs text-galv-600">{it.backtestNote}</span>}
                    {it.backtest ? <>{err(it.backtest.current)} → {err(it.backtest.suggested)}{it.applicable ? <span className="pill ml-1 bg-moss-100 text-moss-700">better</span> : it.suggested !== null ? <span className="pill ml-1 bg-galv-100 text-galv-700">no gain</span> : null}</> : '—'}
                  </td>
                  <td><button type="button" className="text-sm text-timber-700 underline" aria-expanded={open === it.key} onClick={() => setOpen(open === it.key ? null : it.key)}>{open === it.key ? 'Hide jobs' : 'Jobs'}</button></td>
                </tr>
                {open === it.key && (
                  <tr><td colSpan={mayApply ? 10 : 9} className="bg-galv-50">
                    <JobsBehind item={it} money={money} mayApply={mayApply} excl={excl} onExclude={onExclude} onInclude={onInclude} />
                  </td></tr>
                )}
              </Fragment>
            ))}
          </tbody>
        </table>
      </Scroll>
      <p className="mt-1 text-xs text-galv-600">Bid, actual and actual ÷ bid are medians over the jobs, with the middle half of the jobs' ratios in brackets. The error is the bids' mean absolute error of cost, judged leave one out.</p>
      {s.items.some((i) => i.kind === 'rental') && (
        <p className="mt-1 max-w-4xl text-xs text-galv-600" data-testid="rental-note">
          Hours of digging a rental day covers: the digging a job took (the bid's digging hours, scaled by how far its dig-and-set hours ran over or under the bid)
          ÷ the days of auger, skid steer, post driver or excavator it rented. A new bid's rental days are its digging hours ÷ this, rounded up to a half or whole day,
          and its digging hours come from the dig rate, so apply the dig rate's suggestion first where it has one. Jobs with no digging rental recorded are not counted.
        </p>
      )}
      {mayApply && applicable.length > 0 && (
        <form className="mt-3 flex flex-wrap items-end gap-3" onSubmit={(e) => {
          e.preventDefault();
          const items = s.items.filter((i) => chosen.includes(i.key) && i.suggested !== null).map((i) => ({ key: i.key, suggested: i.suggested! }));
          void onApply(items, reason).then(() => { setChosen([]); setReason(''); });
        }}>
          <label className="min-w-72 flex-1"><span className="label">Why (kept with the new rate versions)</span>
            <input className="input" value={reason} onChange={(e) => setReason(e.target.value)} placeholder="e.g. Crews in clay take longer than the bids allow" maxLength={500} />
          </label>
          <button type="submit" className="btn-primary" disabled={busy || chosen.length === 0 || reason.trim().length < 5}>
            Apply {chosen.length || ''} suggestion{chosen.length === 1 ? '' : 's'}
          </button>
        </form>
      )}
      {message && <p className={`mt-2 text-sm ${message.ok ? 'text-moss-700' : 'field-error'}`} role={message.ok ? 'status' : 'alert'} data-testid="apply-message">{message.text}</p>}

      <div className="mt-4 space-y-4">
        <div className="max-w-2xl">
          <h3 className="mb-1 text-sm font-semibold text-galv-800">Actual ÷ estimated cost, by category</h3>
          <table className="table-dense">
            <thead><tr><th>Category</th><th className="num">Jobs</th><th className="num">Median (middle half)</th></tr></thead>
            <tbody>
              {s.categories.map((c) => <tr key={c.group}><td>{COST_GROUP_LABELS[c.group]}</td><td className="num">{c.n}</td><td className="num">{c.ratio ? `${ratio(c.ratio.median)} (${c.ratio.q1.toFixed(2)}–${c.ratio.q3.toFixed(2)})` : '—'}</td></tr>)}
              <tr><td>Rental days</td><td className="num">{s.rentals.n}</td><td className="num">{s.rentals.ratio ? `${ratio(s.rentals.ratio.median)}: ${num(s.rentals.actualMedian, 1)} against ${num(s.rentals.bidMedian, 1)} bid` : '—'}</td></tr>
            </tbody>
          </table>
          <p className="mt-1 text-xs text-galv-600">Rental days, every kind of equipment, as rented against as bid. The days a bid rents follow its digging hours (the dig rate) and the hours a rental day covers, calibrated above.</p>
        </div>
        <details>
          <summary className="cursor-pointer text-sm font-semibold text-galv-800">History of {s.styleName}'s rates and waste ({history.length} versions)</summary>
          <table className="table-dense mt-2" data-testid="rate-history">
            <thead><tr><th>When</th><th>Rate or waste</th><th className="num">Version</th><th className="num">Value</th><th>Who</th><th>Why</th></tr></thead>
            <tbody>{history.map((h) => <tr key={h.key}><td className="whitespace-nowrap">{formatDate(h.at)}</td><td className="min-w-40">{h.what}</td><td className="num">{h.versionNo}</td><td className="num">{h.value}</td><td className="whitespace-nowrap">{h.who ?? '—'}</td><td>{h.reason}</td></tr>)}</tbody>
          </table>
        </details>
      </div>
    </section>
  );
}

function JobsBehind({ item, money, mayApply, excl, onExclude, onInclude }: {
  item: CalibrationItem;
  money: (cents: number | null | undefined) => string;
  mayApply: boolean;
  excl: (jobId: number, scope: string) => Exclusion | undefined;
  onExclude: (jobId: number, scope: string, reason: string) => Promise<string | null>;
  onInclude: (id: number) => Promise<void>;
}) {
  const [form, setForm] = useState<{ jobId: number; scope: string; reason: string; error: string | null } | null>(null);
  return (
    <div>
      <Scroll label={`Jobs behind ${item.label.toLowerCase()}`}>
        <table className="table-dense" aria-label={`Jobs behind ${item.label.toLowerCase()}`}>
          <thead><tr><th>Job</th><th className="num">Bid</th><th className="num">Actual</th><th className="num">Actual ÷ bid</th><th className="num">Fitted without it</th><th className="num">Cost: actual</th><th className="num">At today's rate</th><th className="num">Suggested</th><th></th></tr></thead>
          <tbody>
            {item.jobs.map((j) => {
              const ex = excl(j.jobId, item.key);
              return (
                <tr key={j.jobId} className={ex ? 'text-galv-500' : ''}>
                  <td><a href={`/jobs/${j.jobId}`}>{j.code}</a>{ex && <span className="block text-xs">left out{ex.scope === 'job' ? ' (whole job)' : ''}: {ex.reason}</span>}</td>
                  <td className="num">{valueText(item, j.bid)}</td>
                  <td className="num">{valueText(item, j.actual)}</td>
                  <td className="num">{ratio(j.ratio)}</td>
                  <td className="num">{valueText(item, j.fittedRate)}</td>
                  <td className="num">{money(j.actualCostCents)}</td>
                  <td className="num">{money(j.currentCostCents)}</td>
                  <td className="num">{money(j.suggestedCostCents)}</td>
                  <td>
                    {mayApply && (ex
                      ? <button type="button" className="text-sm text-timber-700 underline" onClick={() => void onInclude(ex.id)}>Count again</button>
                      : <button type="button" className="text-sm text-timber-700 underline" onClick={() => setForm({ jobId: j.jobId, scope: item.key, reason: '', error: null })}>Leave out</button>)}
                  </td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </Scroll>
      {form && (
        <form className="mt-2 flex flex-wrap items-end gap-2" onSubmit={async (e) => {
          e.preventDefault();
          const error = await onExclude(form.jobId, form.scope, form.reason);
          if (error) setForm({ ...form, error }); else setForm(null);
        }}>
          <label><span className="label">Leave {item.jobs.find((j) => j.jobId === form.jobId)?.code} out of</span>
            <select className="input" value={form.scope} onChange={(e) => setForm({ ...form, scope: e.target.value })}>
              <option value={item.key}>{item.label.toLowerCase()} only</option>
              <option value="job">every rate (the whole job)</option>
            </select>
          </label>
          <label className="min-w-64 flex-1"><span className="label">Reason</span><input className="input" value={form.reason} onChange={(e) => setForm({ ...form, reason: e.target.value })} placeholder="e.g. Hit a rock ledge on the back run" /></label>
          <button type="submit" className="btn-secondary" disabled={form.reason.trim().length < 5}>Leave it out</button>
          <button type="button" className="btn-secondary" onClick={() => setForm(null)}>Cancel</button>
          {form.error && <p className="field-error w-full" role="alert">{form.error}</p>}
        </form>
      )}
    </div>
  );
}
