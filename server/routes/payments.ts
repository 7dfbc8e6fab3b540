import type { Knex } from 'knex';
import type { Config } from '../config';
import type { RouteDef } from '../http/route-table';
import { createPaymentsClient } from '../services/payments/client';
import { handlePaymentEvent, verifyEvent } from '../services/payments/webhook';

export function paymentRoutes(knex: Knex, config: Config): RouteDef[] {
  const payments = { stripe: createPaymentsClient(config), config };
  return [
    // Public by design: the provider proves itself with the signature (CSRF-exempt in app.ts).
    {
      method: 'post', path: '/api/payments/webhook', allow: 'public',
      handler: async (req, res) => {
        const event = verifyEvent(payments, req.rawBody, req.header('stripe-signature'));
        res.json({ received: true, outcome: await handlePaymentEvent(knex, payments, event) });
      },
    },
  ];
}
