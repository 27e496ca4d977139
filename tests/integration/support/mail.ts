// Reads what the app sent through the local mail sink's REST API.
const MAIL_WEB_URL = process.env.MAIL_WEB_URL ?? 'http://127.0.0.1:1090';

export type SunkMail = { id: string; subject: string; text: string; to: { address: string }[] };

export async function mailsTo(address: string): Promise<SunkMail[]> {
  const res = await fetch(`${MAIL_WEB_URL}/api/email`);
  if (!res.ok) throw new Error(`mail sink answered ${res.status}`);
  const all = (await res.json()) as SunkMail[];
  return all.filter((m) => m.to.some((t) => t.address.toLowerCase() === address.toLowerCase()));
}

export async function waitForMail(address: string, timeoutMs = 10_000): Promise<SunkMail> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const found = await mailsTo(address);
    if (found.length) return found[found.length - 1];
    if (Date.now() > until) throw new Error(`no mail to ${address} within ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 250));
  }
}
