// A small HTTP client that talks from a chosen loopback address (on Linux all of 127.0.0.0/8 is
// loopback), so a test's per-address rate-limit counts are its own and shared with no other test.
import http from 'node:http';

export interface Reply {
  status: number;
  text: string;
  body: any; // eslint-disable-line @typescript-eslint/no-explicit-any
}

let next = 0;
/** A loopback address no other client of this test process uses, e.g. 127.0.42.7. */
export const freshLoopback = () => {
  next += 1;
  return `127.${(process.pid >> 8) & 255}.${process.pid & 255}.${next % 250 + 2}`;
};

export class LoopbackClient {
  private cookie = '';
  csrf = '';

  constructor(
    private readonly baseUrl: string,
    readonly from: string,
  ) {}

  request(method: string, path: string, json?: unknown, headers: Record<string, string> = {}): Promise<Reply> {
    const url = new URL(path, this.baseUrl);
    const payload = json === undefined ? undefined : JSON.stringify(json);
    return new Promise((resolve, reject) => {
      const req = http.request(url, {
        method, localAddress: this.from,
        headers: {
          ...(payload ? { 'content-type': 'application/json' } : {}),
          ...(this.cookie ? { cookie: this.cookie } : {}),
          ...(this.csrf && method !== 'GET' ? { 'x-csrf-token': this.csrf } : {}),
          ...headers,
        },
      }, (res) => {
        const chunks: Buffer[] = [];
        res.on('data', (c: Buffer) => chunks.push(c));
        res.on('end', () => {
          const setCookie = res.headers['set-cookie'];
          if (setCookie?.length) this.cookie = setCookie.map((c) => c.split(';')[0]).join('; ');
          const text = Buffer.concat(chunks).toString('utf8');
          let body: unknown = null;
          try { body = JSON.parse(text); } catch { body = null; }
          resolve({ status: res.statusCode ?? 0, text, body });
        });
      });
      req.on('error', reject);
      req.end(payload);
    });
  }

  get(path: string, headers?: Record<string, string>) {
    return this.request('GET', path, undefined, headers);
  }

  /** Fetches a CSRF token (and the session cookie that goes with it). */
  async start() {
    this.csrf = (await this.get('/api/auth/csrf')).body.csrfToken;
    return this;
  }

  async post(path: string, json: unknown, headers?: Record<string, string>) {
    const reply = await this.request('POST', path, json, headers);
    if (reply.body?.csrfToken) this.csrf = reply.body.csrfToken;
    return reply;
  }
}
