// Run the mail fake on its own:
//   SMTP_PORT=3125 HTTP_PORT=3126 MAIL_FILE=.data/mail.json tsx server/fakes/mail/main.ts
// MAIL_FAKE_SMTP_PORT / MAIL_FAKE_HTTP_PORT win over the shorter names.
import { runFakeProcess } from '../own-process.js';
import { startMailFake } from './index.js';

await runFakeProcess(
  () => startMailFake({
    smtpPort: Number(process.env.MAIL_FAKE_SMTP_PORT ?? process.env.SMTP_PORT ?? 3125),
    httpPort: Number(process.env.MAIL_FAKE_HTTP_PORT ?? process.env.HTTP_PORT ?? 3126),
    file: process.env.MAIL_FILE || undefined,
  }),
  (fake) => `mail fake: SMTP on 127.0.0.1:${fake.smtpPort}, messages at ${fake.httpUrl}/messages`,
);
