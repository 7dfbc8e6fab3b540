/**
 * Mail fake: an SMTP server on loopback that accepts every message (no auth,
 * no TLS), parses it and keeps it, plus a JSON API over the kept mail (see
 * http.ts). The SMTP listener can be stopped and started again while the
 * HTTP API stays up, so tests can prove that mail waits while SMTP is down.
 */
import { createServer } from 'node:http';
import type { AddressInfo, Server } from 'node:net';
import { simpleParser } from 'mailparser';
import { SMTPServer } from 'smtp-server';
import { mailApi } from './http.js';
import { MailStore, toStored } from './store.js';

export interface MailFakeOptions {
  smtpPort?: number; // 0 = any free port (kept for restarts)
  httpPort?: number; // 0 = any free port
  host?: string; // loopback by default
  file?: string; // optional JSON file mirroring the stored mail
}

export interface MailFake {
  smtpPort: number;
  httpUrl: string;
  store: MailStore;
  stopSmtp(): Promise<void>;
  startSmtp(): Promise<void>;
  close(): Promise<void>;
}

function createSmtp(store: MailStore): SMTPServer {
  return new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS'],
    logger: false,
    banner: 'Kneepoint mail fake',
    size: 25 * 1024 * 1024,
    // On stopSmtp, drop idle client connections quickly instead of after 30 s.
    closeTimeout: 200,
    onData(stream, session, callback) {
      const envelope = {
        from: session.envelope.mailFrom ? session.envelope.mailFrom.address : null,
        to: session.envelope.rcptTo.map((r) => r.address),
      };
      simpleParser(stream)
        .then((parsed) => {
          if (stream.sizeExceeded) return callback(new Error('Message too big for the mail fake'));
          store.add(toStored(parsed, envelope));
          callback();
        })
        .catch((err: Error) => callback(err));
    },
  });
}

function listen(server: Server, port: number, host: string): Promise<void> {
  return new Promise<void>((resolve, reject) => {
    server.once('listening', () => resolve());
    server.once('error', reject);
    server.listen(port, host);
  });
}

export async function startMailFake(opts: MailFakeOptions = {}): Promise<MailFake> {
  const host = opts.host ?? '127.0.0.1';
  const store = new MailStore(opts.file);

  // A fresh SMTPServer per start: a closed one is not meant to be reused.
  let smtp: SMTPServer | null = null;
  let smtpPort = opts.smtpPort ?? 3125;
  const startSmtp = async () => {
    if (smtp) return;
    const server = createSmtp(store);
    // Without a listener, a client's broken connection would crash the process.
    server.on('error', (err) => console.error('[mail-fake] smtp:', err.message));
    await listen(server.server, smtpPort, host);
    smtpPort = (server.server.address() as AddressInfo).port;
    smtp = server;
  };
  const stopSmtp = () =>
    new Promise<void>((resolve) => {
      const server = smtp;
      smtp = null;
      if (!server) return resolve();
      server.close(() => resolve());
    });

  await startSmtp();
  const http = createServer(mailApi(store));
  await listen(http, opts.httpPort ?? 3126, host).catch(async (err) => {
    await stopSmtp();
    throw err;
  });
  const httpPort = (http.address() as AddressInfo).port;

  return {
    get smtpPort() {
      return smtpPort;
    },
    httpUrl: `http://${host}:${httpPort}`,
    store,
    stopSmtp,
    startSmtp,
    close: async () => {
      await stopSmtp();
      await new Promise<void>((resolve) => {
        http.close(() => resolve());
        http.closeAllConnections();
      });
    },
  };
}
