import { useMemo, useState } from 'react';
import { GRAVEL_BASES, GRAVEL_BASE_LABELS, recipeSchema, STYLE_KINDS, STYLE_KIND_LABELS, WASTE_KEYS, type Recipe } from '../../../lib/takeoff/recipe';
import { computeTakeoff } from '../../../lib/takeoff/takeoff';
import { layoutInput, type SiteRules } from '../../../lib/takeoff/input';
import type { Rates } from '../../../lib/takeoff/rates';
import { recipeFor } from '../../../lib/takeoff/defaults';
import { fieldErrors } from '../../../lib/errors';
import { formatFeetInches } from '../../../lib/units';
import { api } from '../ui/api';
import { FormError } from '../ui/Field';

interface Props {
  style: { id: number; name: string; kind: string; description: string | null; active: boolean; recipe: Recipe } | null;
  rates: Rates;
  site: SiteRules;
  canWrite: boolean;
}

const ADVANCED = ['posts', 'rails', 'infill', 'cap', 'hardware', 'gates', 'rentals'] as const;
type Path = (string | number)[];

function setAt<T>(obj: T, path: Path, value: unknown): T {
  const copy: any = Array.isArray(obj) ? [...obj] : { ...obj };
  if (path.length === 1) copy[path[0]] = value;
  else copy[path[0]] = setAt(copy[path[0]], path.slice(1), value);
  return copy;
}

/** A fence style's recipe, editable, tried on a sample run before it is saved. */
export default function StyleEditor({ style, rates, site, canWrite }: Props) {
  const [name, setName] = useState(style?.name ?? '');
  const [kind, setKind] = useState(style?.kind ?? 'wood_privacy');
  const [description, setDescription] = useState(style?.description ?? '');
  const [active, setActive] = useState(style?.active ?? true);
  const [recipe, setRecipe] = useState<any>(style?.recipe ?? recipeFor('wood_privacy'));
  const [advanced, setAdvanced] = useState(() => JSON.stringify(Object.fromEntries(ADVANCED.map((k) => [k, (style?.recipe ?? recipeFor('wood_privacy'))[k]])), null, 2));
  const [jsonError, setJsonError] = useState<string | null>(null);
  const [trial, setTrial] = useState({ lengthFt: '48', heightIn: String(style?.recipe.heightMaxIn ?? 72) });
  const [error, setError] = useState<string | null>(null);
  const [serverFields, setServerFields] = useState<Record<string, string>>({});
  const [saved, setSaved] = useState(false);

  const parsed = recipeSchema.safeParse(recipe);
  const fields = { ...(parsed.success ? {} : fieldErrors(parsed.error.issues)), ...serverFields };
  const trialResult = useMemo(() => {
    if (!parsed.success) return null;
    const l = layoutInput.safeParse({ runs: [{ lengthFt: Number(trial.lengthFt), heightIn: Number(trial.heightIn) }] });
    return l.success ? computeTakeoff(l.data, parsed.data, rates, site) : null;
  }, [JSON.stringify(recipe), trial.lengthFt, trial.heightIn]);

  const change = (path: Path, value: unknown) => { setSaved(false); setServerFields({}); setRecipe(setAt(recipe, path, value)); };
  const numIn = (path: Path, label: string, hint?: string) => {
    const key = path.join('.');
    const value = path.reduce((o: any, k) => o?.[k], recipe);
    return (
      <label className="block">
        <span className="label">{label}</span>
        <input className={`input ${fields[key] ? 'input-error' : ''}`} inputMode="decimal" readOnly={!canWrite} aria-invalid={Boolean(fields[key])}
          value={value ?? ''} onChange={(e) => change(path, e.target.value === '' ? null : Number(e.target.value))} />
        {fields[key] ? <span className="field-error block" role="alert">{fields[key]}</span> : hint ? <span className="mt-1 block text-xs text-galv-500">{hint}</span> : null}
      </label>
    );
  };
  const onAdvanced = (text: string) => {
    setAdvanced(text);
    try {
      const obj = JSON.parse(text);
      setJsonError(null);
      setSaved(false);
      setRecipe({ ...recipe, ...Object.fromEntries(ADVANCED.filter((k) => k in obj).map((k) => [k, obj[k]])) });
    } catch (e) {
      setJsonError(`Not valid JSON yet: ${(e as Error).message}`);
    }
  };
  const useDefaults = () => { const r = recipeFor(kind); setRecipe(r); setAdvanced(JSON.stringify(Object.fromEntries(ADVANCED.map((k) => [k, r[k]])), null, 2)); };

  async function save() {
    if (!parsed.success) return;
    const body = { name, kind, description, active, recipe: parsed.data };
    const r = style ? await api<{ id: number }>(`/api/styles/${style.id}`, { method: 'PATCH', body }) : await api<{ id: number }>('/api/styles', { body });
    if (!r.ok) { setError(r.error.message); setServerFields(r.error.fields ?? {}); return; }
    setError(null);
    if (!style) window.location.assign(`/styles/${r.data.id}`);
    else setSaved(true);
  }

  const e = recipe.embedment ?? {};
  const t = trialResult && trialResult.ok ? trialResult : null;
  return (
    <div className="space-y-4">
      <FormError message={error} />
      <section className="card grid gap-4 sm:grid-cols-2 lg:grid-cols-4">
        <label className="block sm:col-span-2"><span className="label">Name</span><input className={`input ${fields.name ? 'input-error' : ''}`} readOnly={!canWrite} value={name} onChange={(ev) => setName(ev.target.value)} />{fields.name && <span className="field-error block">{fields.name}</span>}</label>
        <label className="block"><span className="label">Kind</span>
          <select className="input" disabled={!canWrite} value={kind} onChange={(ev) => setKind(ev.target.value)}>{STYLE_KINDS.map((k) => <option key={k} value={k}>{STYLE_KIND_LABELS[k]}</option>)}</select>
        </label>
        <label className="flex items-center gap-2 pt-6 text-sm"><input type="checkbox" disabled={!canWrite} checked={active} onChange={(ev) => setActive(ev.target.checked)} /> Offered in new bids</label>
        <label className="block sm:col-span-2 lg:col-span-4"><span className="label">Description</span><input className="input" readOnly={!canWrite} value={description} onChange={(ev) => setDescription(ev.target.value)} /></label>
      </section>
      <div className="grid gap-4 xl:grid-cols-3">
        <section className="card space-y-4 xl:col-span-2" aria-label="Recipe">
          <h2>Bays, posts and holes</h2>
          <div className="grid gap-3 sm:grid-cols-4">
            {numIn(['heightMinIn'], 'Lowest height (in)')}
            {numIn(['heightMaxIn'], 'Tallest height (in)')}
            {numIn(['spacingFt'], 'Post spacing, at most (ft)', 'On centre.')}
            {numIn(['minBayFt'], 'Shortest bay (ft)', 'Shorter warns: the infill will not fit.')}
            {numIn(['kerfIn'], 'Saw kerf (in)')}
            {numIn(['minEmbedmentIn'], 'Least embedment (in)')}
            <label className="block"><span className="label">Embedment rule</span>
              <select className="input" disabled={!canWrite} value={e.rule} onChange={(ev) => {
                const rule = ev.target.value;
                change(['embedment'], rule === 'fixed_depth' ? { rule, depthIn: 24 } : rule === 'depth_plus_per_ft' ? { rule, baseIn: 24, perFtIn: 3, overHeightIn: 48 } : rule === 'stock_split' ? { rule, stockFt: 10, pieces: 2 } : { rule, fraction: rule === 'fraction_of_length' ? 1 / 3 : 0.5 });
              }}>
                <option value="fraction_of_length">A share of the post's length</option>
                <option value="fraction_of_height">A share of the height above grade</option>
                <option value="fixed_depth">A fixed depth</option>
                <option value="depth_plus_per_ft">A depth plus so much per foot of height</option>
                <option value="stock_split">Posts cut from stock in equal pieces</option>
              </select>
            </label>
            {(e.rule === 'fraction_of_length' || e.rule === 'fraction_of_height') && numIn(['embedment', 'fraction'], 'Share (0.33 = a third)')}
            {e.rule === 'fixed_depth' && numIn(['embedment', 'depthIn'], 'Depth (in)')}
            {e.rule === 'depth_plus_per_ft' && <>{numIn(['embedment', 'baseIn'], 'Depth (in)')}{numIn(['embedment', 'perFtIn'], 'Plus per foot (in)', 'A part of a foot counts as a foot.')}{numIn(['embedment', 'overHeightIn'], 'For height over (in)')}</>}
            {e.rule === 'stock_split' && <>{numIn(['embedment', 'stockFt'], 'Stock length (ft)')}{numIn(['embedment', 'pieces'], 'Pieces per stock')}</>}
            {numIn(['hole', 'diameterFactor'], 'Hole Ø ÷ post width', 'About 3 is common practice.')}
            {numIn(['hole', 'diameterIn'], 'Or a fixed hole Ø (in)', 'Empty: use the factor.')}
            {numIn(['hole', 'gravelDepthIn'], 'Gravel base (in)')}
            <label className="block"><span className="label">Gravel base sits</span>
              <select className="input" disabled={!canWrite} value={recipe.hole?.gravelBase ?? 'below_embedment'} onChange={(ev) => change(['hole', 'gravelBase'], ev.target.value)}>
                {GRAVEL_BASES.map((g) => <option key={g} value={g}>{GRAVEL_BASE_LABELS[g]}</option>)}
              </select>
            </label>
            {recipe.hole?.concrete && <>{numIn(['hole', 'concrete', 'bagLb'], 'Concrete bag (lb)')}{numIn(['hole', 'concrete', 'bagYieldCuFt'], 'Bag yield (ft³)', 'A 50 lb bag yields about 0.375 ft³.')}</>}
          </div>
          <h2>Waste (%)</h2>
          <div className="grid gap-3 sm:grid-cols-4">{WASTE_KEYS.map((k) => <div key={k}>{numIn(['wastePct', k], k)}</div>)}</div>
          <h2>Posts, rails, infill, cap, hardware, gates and rentals</h2>
          <p className="text-xs text-galv-500">Each item code (sku) names a price-book item; stock lengths are what the yard sells.</p>
          <textarea className={`input font-mono text-xs ${jsonError ? 'input-error' : ''}`} rows={18} readOnly={!canWrite} spellCheck={false} aria-label="Posts, rails, infill, cap, hardware, gates and rentals as JSON" value={advanced} onChange={(ev) => onAdvanced(ev.target.value)} />
          {jsonError && <p className="field-error" role="alert">{jsonError}</p>}
          {Object.entries(fields).filter(([k]) => ADVANCED.some((a) => k.startsWith(a))).slice(0, 8).map(([k, m]) => <p key={k} className="field-error" role="alert">{k}: {m}</p>)}
          {canWrite && (
            <div className="flex flex-wrap items-center gap-3">
              <button type="button" className="btn-primary" disabled={!parsed.success || Boolean(jsonError)} onClick={save}>{style ? 'Save the style' : 'Create the style'}</button>
              <button type="button" className="btn-secondary" onClick={useDefaults}>Start from the {STYLE_KIND_LABELS[kind as keyof typeof STYLE_KIND_LABELS] ?? kind} defaults</button>
              {saved && <span role="status" className="text-sm text-moss-700">Saved. New bids use it; saved bids keep the recipe they were priced with.</span>}
            </div>
          )}
        </section>
        <section className="card space-y-3" aria-labelledby="try-h" aria-live="polite">
          <h2 id="try-h">Try it on one run</h2>
          <div className="flex gap-2">
            <label><span className="label">Length (ft)</span><input className="input w-24" inputMode="decimal" value={trial.lengthFt} onChange={(ev) => setTrial({ ...trial, lengthFt: ev.target.value })} /></label>
            <label><span className="label">Height (in)</span><input className="input w-24" inputMode="decimal" value={trial.heightIn} onChange={(ev) => setTrial({ ...trial, heightIn: ev.target.value })} /></label>
          </div>
          {!parsed.success && <p className="text-sm text-rust-700">Fix the recipe to try it.</p>}
          {trialResult && !trialResult.ok && <ul className="text-sm text-rust-700">{Object.values(trialResult.fields).map((m, i) => <li key={i}>{m}</li>)}</ul>}
          {t && (
            <>
              <p className="text-sm" data-testid="trial-summary">{t.bays} bays, {t.posts.total} posts; posts {formatFeetInches(t.postGroups[0].lengthIn)} long, {formatFeetInches(t.postGroups[0].embedmentIn)} in the ground, {t.postGroups[0].holeDiameterIn} in holes.</p>
              <table className="table-dense"><tbody>{t.materials.map((m) => <tr key={m.sku}><td>{m.label}</td><td className="num">{m.buyQty} {m.unit}</td></tr>)}</tbody></table>
              {t.warnings.map((w, i) => <p key={i} className="text-sm text-timber-900">⚠ {w}</p>)}
            </>
          )}
        </section>
      </div>
    </div>
  );
}
