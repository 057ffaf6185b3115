import autocannon from 'autocannon';
import { quantile } from '../../lib/stats/robust.ts';

export interface LoadResult {
  requests: number;
  durationS: number;
  rps: number;
  p50: number;
  p95: number;
  p99: number;
  errors: number;
  non2xx: number;
  status5xx: number;
}

/**
 * Drives the server with autocannon on loopback: `paths` are cycled over the connections.
 * Latencies are collected from every response, so p95 is exact, not interpolated.
 */
export async function load(opts: { url: string; paths: string[]; connections: number; durationS: number; cookie?: string }): Promise<LoadResult> {
  const times: number[] = [];
  let status5xx = 0;
  let next = 0;
  let finish: (r: autocannon.Result) => void = () => {};
  let fail: (e: Error) => void = () => {};
  const done = new Promise<autocannon.Result>((resolve, reject) => { finish = resolve; fail = reject; });
  const inst = autocannon({
    url: opts.url,
    connections: opts.connections,
    duration: opts.durationS,
    headers: opts.cookie ? { cookie: opts.cookie } : {},
    requests: [{ method: 'GET', setupRequest: (req: autocannon.Request) => ({ ...req, path: opts.paths[next++ % opts.paths.length] }) }],
  }, (err, res) => (err ? fail(err) : finish(res)));
  inst.on('response', (_client: unknown, statusCode: number, _bytes: number, responseTime: number) => {
    times.push(responseTime);
    if (statusCode >= 500) status5xx++;
  });
  const result = await done;
  const round = (x: number) => Math.round(x * 100) / 100;
  return {
    requests: result.requests.total,
    durationS: result.duration,
    rps: round(result.requests.average),
    p50: round(times.length ? quantile(times, 0.5) : 0),
    p95: round(times.length ? quantile(times, 0.95) : 0),
    p99: round(times.length ? quantile(times, 0.99) : 0),
    errors: result.errors + result.timeouts,
    non2xx: result.non2xx,
    status5xx,
  };
}
