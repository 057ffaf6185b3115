import type { FieldErrors } from '../../../lib/errors';

export interface ApiError {
  status: number;
  code: string;
  message: string;
  fields?: FieldErrors;
}

export type ApiResult<T> = { ok: true; data: T } | { ok: false; error: ApiError };

/** fetch for islands: JSON in, JSON out, the API's error shape on failure. */
export async function api<T>(path: string, init: { method?: string; body?: unknown; signal?: AbortSignal } = {}): Promise<ApiResult<T>> {
  try {
    const res = await fetch(path, {
      method: init.method ?? (init.body === undefined ? 'GET' : 'POST'),
      headers: init.body === undefined ? { accept: 'application/json' } : { 'content-type': 'application/json', accept: 'application/json' },
      body: init.body === undefined ? undefined : JSON.stringify(init.body),
      credentials: 'same-origin',
      signal: init.signal,
    });
    if (res.status === 204) return { ok: true, data: undefined as T };
    const data = await res.json().catch(() => null);
    if (res.ok) return { ok: true, data: data as T };
    const e = (data?.error ?? {}) as Partial<ApiError>;
    // better-auth answers { code, message } without the envelope.
    return {
      ok: false,
      error: {
        status: res.status,
        code: e.code ?? data?.code ?? 'ERROR',
        message: e.message ?? data?.message ?? `The request failed (${res.status}).`,
        fields: e.fields,
      },
    };
  } catch (err) {
    if ((err as Error).name === 'AbortError') throw err;
    return { ok: false, error: { status: 0, code: 'NETWORK', message: 'Could not reach Tallypost. Check the connection and try again.' } };
  }
}
