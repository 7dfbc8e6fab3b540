import Stripe from 'stripe';
import type { Config } from '../../config';
import { DomainError } from '../../errors';

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

/**
 * Runs a provider call; a provider refusal or outage becomes a 502 in the shop's words instead of
 * a 500, so the customer learns that paying, not Kneepoint, is the problem. The provider's own
 * message goes to the server log for staff, not to the shopper.
 */
export async function withProvider<T>(call: () => Promise<T>): Promise<T> {
  try {
    return await call();
  } catch (error) {
    if (error instanceof Stripe.errors.StripeError) {
      console.error(`[payments] provider refused: ${error.type} ${error.code ?? ''} ${error.message}`);
      throw new DomainError(502, 'payments_provider', 'The payments service refused the request or could not be reached; please try again in a few minutes.');
    }
    throw error;
  }
}
