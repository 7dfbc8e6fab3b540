// Run the mail fake on its own:
//   SMTP_PORT=3125 HTTP_PORT=3126 MAIL_FILE=.data/mail.json tsx server/fakes/mail/main.ts
// MAIL_FAKE_SMTP_PORT / MAIL_FAKE_HTTP_PORT win over the shorter names.
import { startMailFake } from './index.js';

const fake = await startMailFake({
  smtpPort: Number(process.env.MAIL_FAKE_SMTP_PORT ?? process.env.SMTP_PORT ?? 3125),
  httpPort: Number(process.env.MAIL_FAKE_HTTP_PORT ?? process.env.HTTP_PORT ?? 3126),
  file: process.env.MAIL_FILE || undefined,
});
console.log(`mail fake: SMTP on 127.0.0.1:${fake.smtpPort}, messages at ${fake.httpUrl}/messages`);

let stopping = false;
const stop = () => {
  if (stopping) return;
  stopping = true;
  void fake.close().then(() => process.exit(0));
};
process.on('SIGINT', stop);
process.on('SIGTERM', stop);
// Under `npm start` the supervisor holds an IPC channel: if it goes away, so does this fake.
if (process.send) {
  process.on('disconnect', stop);
  process.channel?.unref();
}
