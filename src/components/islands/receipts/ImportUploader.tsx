import { useRef, useState, type DragEvent } from 'react';
import Papa from 'papaparse';
import { chooseMapping, FIELD_LABELS, FIELDS_OF, guessMapping, requiredProblems, type ImportKind, type Mapping, type MappedField } from '../../../lib/csv/mapping';
import { sniffDelimiter } from '../../../lib/csv/tokenizer';
import { DATE_FORMATS, DATE_FORMAT_LABELS } from '../../../lib/csv/dates';
import type { CommitSummary, ImportDetail } from '../../../lib/csv/imports';
import { api } from '../ui/api';
import { CategorySelect, Notice } from '../costs/ui';
import ImportReview from './ImportReview';

export interface SavedMappingView {
  supplierId: number | null;
  supplierName: string | null;
  mapping: Mapping;
  headerSignature: string;
}

interface Props {
  kind: ImportKind;
  /** /api/receipts/imports or /api/time/imports */
  endpoint: string;
  /** /receipts or /time/imports: where an import's own page lives */
  pageBase: string;
  suppliers: { id: number; name: string }[];
  saved: SavedMappingView[];
}

type Step = 'reading' | 'mapping' | 'uploading' | 'preview' | 'committing' | 'done' | 'failed';

interface Job {
  key: string;
  file: File;
  step: Step;
  /** 0–100 while reading or uploading */
  progress: number;
  rows: number;
  headers: string[];
  sample: string[][];
  delimiter: string;
  mapping: Mapping | null;
  mappingNote: string;
  /** a supplier id, or a new supplier's name */
  supplier: string;
  detail: ImportDetail | null;
  summary: CommitSummary | null;
  error: string | null;
  fields: Record<string, string>;
}

const SAMPLE = 8;
const NEW = '__new__';

function sizeText(bytes: number): string {
  return bytes > 1024 * 1024 ? `${(bytes / 1024 / 1024).toFixed(1)} MB` : `${Math.max(1, Math.round(bytes / 1024))} KB`;
}

function ProgressBar({ value, label }: { value: number; label: string }) {
  const v = Math.round(Math.min(100, Math.max(0, value)));
  return (
    <div>
      <div className="mb-1 flex justify-between text-xs text-galv-600"><span>{label}</span><span>{v} %</span></div>
      <div role="progressbar" aria-label={label} aria-valuemin={0} aria-valuemax={100} aria-valuenow={v} className="h-2 overflow-hidden rounded-full bg-galv-100">
        <div className="h-full rounded-full bg-timber-600 transition-[width]" style={{ width: `${v}%` }} />
      </div>
    </div>
  );
}

/**
 * Drop or pick CSV files; each is read in the browser (papaparse, with a progress bar) to show
 * its first rows and map its columns, then uploaded, checked by the server row by row, and
 * committed. The mapping saved for a supplier is chosen again when its headers come back.
 */
export default function ImportUploader({ kind, endpoint, pageBase, suppliers, saved }: Props) {
  const [jobs, setJobs] = useState<Job[]>([]);
  const [over, setOver] = useState(false);
  const input = useRef<HTMLInputElement>(null);
  const patch = (key: string, p: Partial<Job>) => setJobs((js) => js.map((j) => (j.key === key ? { ...j, ...p } : j)));
  const active = jobs.find((j) => !['done', 'failed'].includes(j.step));

  function pick(mapping: Mapping | null, headers: string[], sample: string[][], supplier: string): { mapping: Mapping; note: string; supplier: string } {
    const supplierId = /^\d+$/.test(supplier) ? Number(supplier) : null;
    const chosen = chooseMapping(saved, headers, supplierId);
    if (chosen) {
      const who = chosen.supplierName ?? suppliers.find((s) => s.id === chosen.supplierId)?.name;
      return { mapping: chosen.mapping, note: who ? `The mapping saved for ${who}.` : 'A mapping saved for these headers.', supplier: supplier || (chosen.supplierId ? String(chosen.supplierId) : '') };
    }
    return { mapping: mapping ?? guessMapping(kind, headers, sample), note: 'Guessed from the headers: check each column before uploading.', supplier };
  }

  /**
   * The delimiter from the header line, as the server reads it: papaparse's own guess looks
   * at data rows too and takes the comma in a European "6,45" for the separator.
   */
  async function headerDelimiter(file: File): Promise<string> {
    const head = await file.slice(0, 64 * 1024).text();
    const end = head.search(/\r|\n/);
    return sniffDelimiter(end < 0 ? head : head.slice(0, end));
  }

  async function read(file: File) {
    const key = `${file.name}-${file.size}-${Math.random().toString(36).slice(2)}`;
    const job: Job = { key, file, step: 'reading', progress: 0, rows: 0, headers: [], sample: [], delimiter: ',', mapping: null, mappingNote: '', supplier: '', detail: null, summary: null, error: null, fields: {} };
    setJobs((js) => [...js, job]);
    let headers: string[] | null = null;
    const sample: string[][] = [];
    let rows = 0;
    /** the file's final line break leaves one empty row behind, which is not a row */
    let trailingEmpty = false;
    const delimiter = await headerDelimiter(file);
    Papa.parse<string[]>(file, {
      delimiter,
      skipEmptyLines: false,
      chunkSize: 256 * 1024,
      chunk: (res) => {
        for (const row of res.data) {
          if (!headers) { if (row.some((c) => c.trim())) headers = row.map((c, i) => (i === 0 ? c.replace(/^\uFEFF/, '') : c).trim()); continue; }
          rows++;
          trailingEmpty = row.length === 1 && row[0] === '';
          if (sample.length < SAMPLE) sample.push(row);
        }
        patch(key, { progress: (res.meta.cursor / Math.max(1, file.size)) * 100, rows });
      },
      complete: () => {
        if (trailingEmpty) rows--;
        const h = headers ?? [];
        const chosen = pick(null, h, sample, '');
        patch(key, { step: 'mapping', progress: 100, rows, headers: h, sample, delimiter, mapping: chosen.mapping, mappingNote: chosen.note, supplier: chosen.supplier });
      },
      error: (err) => patch(key, { step: 'failed', error: `This file could not be read: ${err.message}` }),
    });
  }

  function addFiles(list: FileList | null) {
    for (const f of Array.from(list ?? [])) void read(f);
  }

  function onDrop(e: DragEvent) {
    e.preventDefault();
    setOver(false);
    addFiles(e.dataTransfer.files);
  }

  function setColumn(job: Job, field: MappedField, header: string) {
    patch(job.key, { mapping: { ...job.mapping!, columns: { ...job.mapping!.columns, [field]: header || null } }, mappingNote: 'Mapped by hand.' });
  }

  function upload(job: Job) {
    const problems = requiredProblems(job.mapping!);
    if (Object.keys(problems).length) { patch(job.key, { fields: problems, error: 'Choose the columns marked below.' }); return; }
    patch(job.key, { step: 'uploading', progress: 0, error: null, fields: {} });
    const form = new FormData();
    if (kind === 'receipts' && job.supplier.trim()) form.append('supplier', job.supplier.trim());
    const { kind: _k, ...mapping } = job.mapping!;
    form.append('mapping', JSON.stringify({ ...mapping, delimiter: job.delimiter === '\t' || job.delimiter === ';' || job.delimiter === ',' ? job.delimiter : 'auto' }));
    form.append('file', job.file, job.file.name);
    const xhr = new XMLHttpRequest();
    xhr.open('POST', endpoint);
    xhr.setRequestHeader('accept', 'application/json');
    xhr.upload.onprogress = (e) => e.lengthComputable && patch(job.key, { progress: (e.loaded / e.total) * 100 });
    xhr.onload = () => {
      const body = (() => { try { return JSON.parse(xhr.responseText); } catch { return null; } })();
      if (xhr.status === 201) patch(job.key, { step: 'preview', progress: 100, detail: body });
      else patch(job.key, { step: 'mapping', error: body?.error?.message ?? `The upload failed (${xhr.status}).`, fields: body?.error?.fields ?? {} });
    };
    xhr.onerror = () => patch(job.key, { step: 'mapping', error: 'Could not reach Tallypost. Check the connection and try again.' });
    xhr.send(form);
  }

  async function refresh(job: Job) {
    const r = await api<ImportDetail>(`${endpoint}/${job.detail!.id}`);
    if (r.ok) patch(job.key, { detail: r.data });
  }

  async function commit(job: Job, allOrNothing: boolean) {
    patch(job.key, { step: 'committing', error: null });
    const r = await api<{ summary: CommitSummary; import: ImportDetail }>(`${endpoint}/${job.detail!.id}/commit`, { body: { allOrNothing } });
    if (r.ok) patch(job.key, { step: 'done', summary: r.data.summary, detail: r.data.import });
    else patch(job.key, { step: 'preview', error: r.error.message });
  }

  async function discard(job: Job) {
    if (job.detail) await api(`${endpoint}/${job.detail.id}`, { method: 'DELETE' });
    setJobs((js) => js.filter((j) => j.key !== job.key));
  }

  return (
    <div className="space-y-4" data-testid="import-uploader">
      <div
        onDragOver={(e) => { e.preventDefault(); setOver(true); }}
        onDragLeave={() => setOver(false)}
        onDrop={onDrop}
        className={`rounded-lg border-2 border-dashed p-6 text-center ${over ? 'border-timber-600 bg-timber-100' : 'border-timber-300 bg-white'}`}
      >
        <p className="font-medium">Drop CSV files here</p>
        <p className="text-sm text-galv-600">or</p>
        <button type="button" className="btn-primary mt-2" onClick={() => input.current?.click()}>Choose files</button>
        <input ref={input} type="file" accept=".csv,.txt,.tsv,text/csv" multiple className="sr-only" aria-label="CSV files to import" onChange={(e) => { addFiles(e.target.files); e.target.value = ''; }} />
        <p className="mt-2 text-xs text-galv-500">Comma, semicolon or tab separated, up to 25 MB each. The original file is kept with the import.</p>
      </div>

      {jobs.map((job) => {
        const isActive = job === active;
        const m = job.mapping;
        return (
          <section key={job.key} className="card space-y-3" aria-label={`Import of ${job.file.name}`}>
            <div className="flex flex-wrap items-baseline justify-between gap-2">
              <h3 className="font-semibold">{job.file.name} <span className="text-sm font-normal text-galv-500">{sizeText(job.file.size)}{job.rows ? ` · ${job.rows.toLocaleString('en-US')} rows` : ''}</span></h3>
              {job.step !== 'done' && job.step !== 'committing' && <button type="button" className="text-xs underline" onClick={() => discard(job)}>Remove</button>}
            </div>
            {job.step === 'reading' && <ProgressBar value={job.progress} label="Reading the file" />}
            {job.step === 'uploading' && <ProgressBar value={job.progress} label="Uploading" />}
            {job.step !== 'reading' && job.step !== 'uploading' && job.progress === 100 && !job.detail && <ProgressBar value={100} label={`Read ${job.rows.toLocaleString('en-US')} rows`} />}
            {job.error && <p role="alert" className="rounded-md border border-rust-600 bg-rust-100 px-3 py-2 text-sm text-rust-700">{job.error}</p>}

            {job.step === 'mapping' && m && (
              <div className="space-y-3">
                <p className="text-sm text-galv-600">{job.mappingNote}</p>
                <div className="overflow-x-auto rounded-md border border-galv-200">
                  <table className="table-dense text-xs" aria-label="First rows of the file">
                    <thead><tr>{job.headers.map((h, i) => {
                      const field = Object.entries(m.columns).find(([, v]) => v === h)?.[0] as MappedField | undefined;
                      return <th key={i}>{h}{field && <span className="block font-normal text-timber-700">→ {FIELD_LABELS[field]}</span>}</th>;
                    })}</tr></thead>
                    <tbody>{job.sample.map((r, i) => <tr key={i}>{job.headers.map((_, c) => <td key={c} className="whitespace-nowrap">{r[c]}</td>)}</tr>)}</tbody>
                  </table>
                </div>
                {isActive && (
                  <>
                    {kind === 'receipts' && (
                      <div className="grid gap-3 sm:grid-cols-2">
                        <label>
                          <span className="label">Supplier</span>
                          <select className="input" value={/^\d+$/.test(job.supplier) || job.supplier === '' ? job.supplier : NEW} onChange={(e) => {
                            const supplier = e.target.value === NEW ? ' ' : e.target.value;
                            const chosen = pick(job.mapping, job.headers, job.sample, supplier.trim() ? supplier : '');
                            patch(job.key, { supplier, ...(chosen.note.startsWith('The mapping saved') ? { mapping: chosen.mapping, mappingNote: chosen.note } : {}) });
                          }}>
                            <option value="">From the file, or none</option>
                            {suppliers.map((s) => <option key={s.id} value={s.id}>{s.name}</option>)}
                            <option value={NEW}>A new supplier…</option>
                          </select>
                        </label>
                        {!/^\d+$/.test(job.supplier) && job.supplier !== '' && (
                          <label>
                            <span className="label">New supplier’s name</span>
                            <input className="input" value={job.supplier.trim()} onChange={(e) => patch(job.key, { supplier: e.target.value || ' ' })} />
                          </label>
                        )}
                      </div>
                    )}
                    <fieldset className="grid gap-3 sm:grid-cols-2 lg:grid-cols-3">
                      <legend className="label">Which column holds what</legend>
                      {FIELDS_OF[kind].map((field) => (
                        <label key={field}>
                          <span className="text-xs font-medium text-galv-700">{FIELD_LABELS[field]}</span>
                          <select className={`input py-1 ${job.fields[`columns.${field}`] ? 'input-error' : ''}`} aria-label={`Column for ${FIELD_LABELS[field]}`} value={m.columns[field] ?? ''} onChange={(e) => setColumn(job, field, e.target.value)}>
                            <option value="">— not in this file —</option>
                            {job.headers.map((h, i) => <option key={i} value={h}>{h}</option>)}
                          </select>
                          {job.fields[`columns.${field}`] && <span className="field-error block text-xs">{job.fields[`columns.${field}`]}</span>}
                        </label>
                      ))}
                    </fieldset>
                    <div className="grid gap-3 sm:grid-cols-3">
                      <label>
                        <span className="label">Dates are written</span>
                        <select className="input" value={m.dateFormat} onChange={(e) => patch(job.key, { mapping: { ...m, dateFormat: e.target.value as Mapping['dateFormat'] } })}>
                          {DATE_FORMATS.map((f) => <option key={f} value={f}>{DATE_FORMAT_LABELS[f]}</option>)}
                        </select>
                      </label>
                      <label>
                        <span className="label">Decimal mark</span>
                        <select className="input" value={m.decimal} onChange={(e) => patch(job.key, { mapping: { ...m, decimal: e.target.value as Mapping['decimal'] } })}>
                          <option value=".">Point: 1,234.56</option>
                          <option value=",">Comma: 1.234,56</option>
                        </select>
                      </label>
                      {kind === 'receipts' && (
                        <label>
                          <span className="label">Category for items not in the price book</span>
                          <CategorySelect value={m.defaultCategory} onChange={(c) => patch(job.key, { mapping: { ...m, defaultCategory: c } })} />
                        </label>
                      )}
                    </div>
                    <p className="text-xs text-galv-500">Separated by {job.delimiter === '\t' ? 'tabs' : job.delimiter === ';' ? 'semicolons' : 'commas'}. Rows are checked on the server; nothing is added until you commit.</p>
                    <button type="button" className="btn-primary" onClick={() => upload(job)}>Upload and check {job.rows.toLocaleString('en-US')} rows</button>
                  </>
                )}
              </div>
            )}

            {(job.step === 'preview' || job.step === 'committing') && job.detail && (
              <ImportReview detail={job.detail} kind={kind} endpoint={endpoint} busy={job.step === 'committing'} onCommit={(aon) => commit(job, aon)} onChanged={() => refresh(job)} />
            )}

            {job.step === 'done' && job.summary && job.detail && (
              <div className="space-y-2" data-testid="commit-result">
                <Notice tone={job.summary.added ? 'ok' : 'warn'}>{job.summary.message}</Notice>
                <p className="flex flex-wrap gap-3 text-sm">
                  <a href={`${pageBase}/${job.detail.id}`}>Open import #{job.detail.id}</a>
                  {kind === 'receipts' && job.summary.unmatched > 0 && <a href={`/receipts/allocate?importId=${job.detail.id}`} className="font-semibold">Allocate {job.summary.unmatched} unmatched line{job.summary.unmatched === 1 ? '' : 's'}</a>}
                  {job.summary.priceBookUpdates > 0 && <span className="text-galv-600">{job.summary.priceBookUpdates} price book item{job.summary.priceBookUpdates === 1 ? '' : 's'} updated</span>}
                </p>
              </div>
            )}
          </section>
        );
      })}
    </div>
  );
}
