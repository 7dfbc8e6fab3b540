// Run the payments fake on its own:
//   PAYMENTS_FAKE_PORT=3101 WEBHOOK_URL=http://127.0.0.1:3000/api/payments/webhook \
//   WEBHOOK_SECRET=whsec_kneepoint_local tsx server/fakes/payments/main.ts
// PAYMENTS_API_KEY, when set, is the only API key the fake accepts (npm start gives it the app's).
// PAYMENTS_FAKE_PORT wins over PORT, so a PORT meant for the app and inherited
// by a child process does not make the fake take the app's port.
import { runFakeProcess } from '../own-process.js';
import { DEFAULT_WEBHOOK_SECRET, startPaymentsFake } from './index.js';

await runFakeProcess(
  () => startPaymentsFake({
    port: Number(process.env.PAYMENTS_FAKE_PORT ?? process.env.PORT ?? 3101),
    webhookUrl: process.env.WEBHOOK_URL || null,
    webhookSecret: process.env.WEBHOOK_SECRET || DEFAULT_WEBHOOK_SECRET,
    apiKey: process.env.PAYMENTS_API_KEY || undefined,
  }),
  (fake) => `payments fake listening on ${fake.url} (webhooks → ${process.env.WEBHOOK_URL || 'none'})`,
);
