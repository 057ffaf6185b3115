import http from 'node:http';
import { stack } from './stack.ts';

export interface Res<T = any> {
  status: number;
  headers: http.IncomingHttpHeaders;
  body: T;
  text: string;
}

let nextAddress = 2 + Math.floor(Math.random() * 200);

/**
 * A cookie-keeping HTTP client for API tests. Each client connects from its own loopback
 * address (127.0.x.y), as separate machines would, so rate-limit buckets are its own.
 */
export class Client {
  cookies = new Map<string, string>();
  readonly localAddress: string;
  constructor(readonly baseUrl = stack().appUrl, localAddress?: string) {
    const n = nextAddress++;
    this.localAddress = localAddress ?? `127.0.${(n >> 8) & 255}.${(n & 255) || 1}`;
  }

  cookieHeader(): string {
    return [...this.cookies].map(([k, v]) => `${k}=${v}`).join('; ');
  }

  request<T = any>(method: string, path: string, opts: { json?: unknown; body?: string | Buffer; headers?: Record<string, string>; origin?: string | null } = {}): Promise<Res<T>> {
    const url = new URL(path, this.baseUrl);
    const headers: Record<string, string> = { accept: 'application/json', ...opts.headers };
    if (opts.origin !== null && method !== 'GET' && method !== 'HEAD') headers.origin = opts.origin ?? new URL(this.baseUrl).origin;
    let payload: string | Buffer | undefined = opts.body;
    if (opts.json !== undefined) {
      payload = JSON.stringify(opts.json);
      headers['content-type'] ??= 'application/json';
    }
    if (payload !== undefined) headers['content-length'] = String(Buffer.byteLength(payload));
    const cookie = this.cookieHeader();
    if (cookie) headers.cookie = cookie;
    return new Promise((resolve, reject) => {
      const req = http.request({ hostname: url.hostname, port: url.port, path: url.pathname + url.search, method, headers, localAddress: this.localAddress }, (res) => {
        const chunks: Buffer[] = [];
        res.on('data', (c) => chunks.push(c));
        res.on('end', () => {
          for (const sc of res.headers['set-cookie'] ?? []) {
            const [pair, ...attrs] = sc.split(';');
            const i = pair.indexOf('=');
            const name = pair.slice(0, i).trim();
            const value = pair.slice(i + 1).trim();
            const expired = attrs.some((a) => /max-age=0/i.test(a.trim())) || value === '';
            if (expired) this.cookies.delete(name);
            else this.cookies.set(name, value);
          }
          const text = Buffer.concat(chunks).toString('utf8');
          let body: unknown = text;
          if ((res.headers['content-type'] ?? '').includes('json')) {
            try { body = JSON.parse(text); } catch { body = text; }
          }
          resolve({ status: res.statusCode ?? 0, headers: res.headers, body: body as T, text });
        });
      });
      req.on('error', reject);
      if (payload !== undefined) req.write(payload);
      req.end();
    });
  }

  get<T = any>(path: string, headers?: Record<string, string>) { return this.request<T>('GET', path, { headers }); }
  post<T = any>(path: string, json?: unknown, headers?: Record<string, string>) { return this.request<T>('POST', path, { json: json ?? {}, headers }); }
  patch<T = any>(path: string, json?: unknown) { return this.request<T>('PATCH', path, { json: json ?? {} }); }
  delete<T = any>(path: string) { return this.request<T>('DELETE', path, { json: {} }); }

  async signIn(email: string, password: string): Promise<Res> {
    return this.post('/api/auth/sign-in/email', { email, password });
  }
}
