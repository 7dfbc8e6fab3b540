import Stripe from 'stripe';
import type { Config } from '../../config';

/**
 * The payments provider's official SDK, pointed by configuration alone at the provider or at
 * the local fake (server/fakes/payments). Nothing else in Kneepoint talks to payments.
 */
export function createPaymentsClient(config: Config): Stripe {
  return new Stripe(config.PAYMENTS_API_KEY, {
    host: config.PAYMENTS_HOST,
    port: config.PAYMENTS_PORT,
    protocol: config.PAYMENTS_PROTOCOL,
    maxNetworkRetries: 2,
    timeout: 15_000,
  });
}

export interface PaymentsDeps {
  stripe: Stripe;
  config: Config;
}
