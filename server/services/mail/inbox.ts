import { DomainError, notFound } from '../../errors';

const unreachable = (why: string) => new DomainError(502, 'mail_inbox_unreachable', why);

// The staff inbox reads the mail fake's HTTP API (or, in production, whatever inbox service
// MAIL_INBOX_URL names). It proxies only these three reads.

async function getJson(base: string, path: string) {
  const res = await fetch(new URL(path, base), { signal: AbortSignal.timeout(5_000) }).catch(() => null);
  if (!res) throw unreachable('The mail inbox cannot be reached');
  if (res.status === 404) throw notFound('No such message');
  if (!res.ok) throw unreachable(`The mail inbox answered ${res.status}`);
  return res.json();
}

export const listMessages = (base: string, to?: string) => getJson(base, `/messages${to ? `?to=${encodeURIComponent(to)}` : ''}`);
export const getMessage = (base: string, id: string) => getJson(base, `/messages/${encodeURIComponent(id)}`);

export async function getAttachment(base: string, id: string, index: number) {
  const res = await fetch(new URL(`/messages/${encodeURIComponent(id)}/attachments/${index}`, base), { signal: AbortSignal.timeout(10_000) }).catch(() => null);
  if (!res || res.status === 404) throw notFound('No such attachment');
  return { contentType: res.headers.get('content-type') ?? 'application/octet-stream', disposition: res.headers.get('content-disposition'), body: Buffer.from(await res.arrayBuffer()) };
}
