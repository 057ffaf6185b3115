import { stack } from './stack.ts';

export interface SinkMail {
  id: string;
  subject: string;
  to: { address: string }[];
  text: string;
  html: string;
  attachments?: { generatedFileName: string; contentType: string; fileName: string }[];
  headers: Record<string, string>;
  messageId?: string;
}

/** All mail the local sink holds for one address. */
export async function mailTo(address: string): Promise<SinkMail[]> {
  // The sink filters by recipient itself, so a long suite's inbox is not sent over each time.
  const res = await fetch(`${stack().mailApi}/api/email?to.address=${encodeURIComponent(address.toLowerCase())}`);
  const all = (await res.json()) as SinkMail[];
  return all.filter((m) => m.to.some((t) => t.address.toLowerCase() === address.toLowerCase()));
}

/** Waits until the sink holds at least n mails for the address (the outbox worker polls). */
export async function waitForMail(address: string, n = 1, timeoutMs = 20_000): Promise<SinkMail[]> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const got = await mailTo(address);
    if (got.length >= n) return got;
    if (Date.now() > until) throw new Error(`expected ${n} mail(s) to ${address}, the sink has ${got.length}`);
    await new Promise((r) => setTimeout(r, 250));
  }
}
