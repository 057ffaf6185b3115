import http from 'node:http';

export interface StripeFakeOptions {
  webhookUrl: string;
  webhookSecret: string;
  publicUrl: string;
}

/**
 * A local stand-in for the parts of the Stripe API that Tallypost calls. The Stripe SDK
 * is pointed at it (host, port, protocol). The invoicing work fills in checkout sessions,
 * the hosted pay page, refunds and signed webhooks.
 */
export function createStripeFake(_opts: StripeFakeOptions): http.Server {
  return http.createServer((req, res) => {
    if (req.url === '/healthz') {
      res.writeHead(200, { 'content-type': 'application/json' });
      res.end('{"ok":true}');
      return;
    }
    res.writeHead(404, { 'content-type': 'application/json' });
    res.end(JSON.stringify({ error: { type: 'invalid_request_error', message: `Unrecognized request URL (${req.method} ${req.url})` } }));
  });
}
