import { db } from './db.ts';

/**
 * Reports computed over a company's whole history (margins by style over thousands of jobs)
 * are kept in this process and served again while the company's data version is unchanged.
 * Every API write and every payment webhook raises the version after it commits, so the next
 * read in any process recomputes. The version lives in MariaDB, so app processes share it and
 * keep nothing that correctness depends on; an entry is also dropped after MAX_AGE_MS, which
 * bounds how long a change made outside the API (a script, a restore) can go unseen.
 */
const MAX_ENTRIES = 500;
const MAX_AGE_MS = 60_000;

interface Entry { version: number; at: number; value: unknown }
const entries = new Map<string, Entry>();
const inFlight = new Map<string, Promise<unknown>>();

export async function dataVersion(companyId: string): Promise<number> {
  const row = await db()('company_data_versions').where('organization_id', companyId).first('version');
  return Number(row?.version ?? 0);
}

/** Called after a change to a company's data has committed. */
export async function bumpDataVersion(companyId: string): Promise<void> {
  if (!companyId) return;
  await db().raw('INSERT INTO company_data_versions (organization_id, version) VALUES (?, 1) ON DUPLICATE KEY UPDATE version = version + 1', [companyId]);
}

/**
 * The value for (company, key) at the company's current version: from this process's memory
 * when it was computed at that version, else computed now. `fresh` skips the memory (a
 * request sent with Cache-Control: no-cache); `version` is the actor's, read with the session.
 */
export async function cachedReport<T>(companyId: string, key: string, compute: () => Promise<T>, opts: { fresh?: boolean; version?: number } = {}): Promise<T> {
  // The version is read before computing (or came with the request's session read): a change
  // committed meanwhile raises it, so the entry stored here is replaced on the next read
  // rather than served stale.
  const version = opts.version ?? (await dataVersion(companyId));
  const id = `${companyId}\u0000${key}`;
  const hit = entries.get(id);
  if (!opts.fresh && hit && hit.version === version && Date.now() - hit.at < MAX_AGE_MS) return hit.value as T;
  // Many people opening the same report at once compute it once.
  const flightId = `${id}\u0000${version}`;
  const flying = opts.fresh ? undefined : inFlight.get(flightId);
  if (flying) return flying as Promise<T>;
  const promise = compute();
  if (!opts.fresh) inFlight.set(flightId, promise);
  try {
    const value = await promise;
    entries.delete(id);
    entries.set(id, { version, at: Date.now(), value });
    // Oldest first: Map keeps insertion order.
    while (entries.size > MAX_ENTRIES) entries.delete(entries.keys().next().value as string);
    return value;
  } finally {
    if (inFlight.get(flightId) === promise) inFlight.delete(flightId);
  }
}

/** A stable key for a filter object. */
export function filterKey(name: string, filter: object): string {
  const sorted = Object.fromEntries(Object.entries(filter).filter(([, v]) => v !== undefined).sort(([a], [b]) => a.localeCompare(b)));
  return `${name}:${JSON.stringify(sorted)}`;
}
