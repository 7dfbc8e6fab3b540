// A tiny HTTP endpoint that records the webhooks the payments fake sends,
// and can be told to fail the next few deliveries to exercise retries.
import { type Server, createServer } from 'node:http';
import type { AddressInfo } from 'node:net';

export interface Received {
  body: string;
  signature: string;
  type: string;
  id: string;
}

export interface Receiver {
  url: string;
  received: Received[];
  failNext(n: number): void;
  waitFor(pred: (r: Received) => boolean, timeoutMs?: number): Promise<Received>;
  close(): Promise<void>;
}

export async function startReceiver(): Promise<Receiver> {
  const received: Received[] = [];
  let failures = 0;
  const server: Server = createServer((req, res) => {
    const chunks: Buffer[] = [];
    req.on('data', (c: Buffer) => chunks.push(c));
    req.on('end', () => {
      if (failures > 0) {
        failures--;
        res.writeHead(500).end('not now');
        return;
      }
      const body = Buffer.concat(chunks).toString('utf8');
      const event = JSON.parse(body) as { id: string; type: string };
      received.push({ body, signature: String(req.headers['stripe-signature']), type: event.type, id: event.id });
      res.writeHead(200).end('ok');
    });
  });
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  const { port } = server.address() as AddressInfo;

  return {
    url: `http://127.0.0.1:${port}/webhook`,
    received,
    failNext: (n) => {
      failures = n;
    },
    async waitFor(pred, timeoutMs = 5_000) {
      const until = Date.now() + timeoutMs;
      for (;;) {
        const hit = received.find(pred);
        if (hit) return hit;
        if (Date.now() > until) throw new Error('webhook not received in time');
        await new Promise((r) => setTimeout(r, 20));
      }
    },
    close: () =>
      new Promise<void>((resolve) => {
        server.close(() => resolve());
        server.closeAllConnections();
      }),
  };
}
