// What a shopper reads when a payment fails: the shop's own sentences, chosen by the provider's
// error code (and decline code, which is more specific). The provider's own message never reaches
// a shopper's page or mail; staff see the codes in the order's staff-only payment details.
// Codes are the provider API's documented `code` / `decline_code` values.

/** One table, code → sentence. Each sentence stands after "Your payment did not go through: ". */
export const PAYMENT_FAILURE_SENTENCES: Record<string, string> = {
  card_declined: 'your bank declined it.',
  generic_decline: 'your bank declined it.',
  do_not_honor: 'your bank declined it.',
  insufficient_funds: 'the card does not have enough funds for this order.',
  lost_card: 'your bank declined it.',
  stolen_card: 'your bank declined it.',
  expired_card: 'the card has expired.',
  incorrect_cvc: 'the security code did not match the card.',
  incorrect_number: 'the card number is not right.',
  payment_intent_authentication_failure: 'it was not confirmed with your bank.',
  authentication_required: 'your bank wants you to confirm it, and that step was not finished.',
  processing_error: 'the payment could not be processed just now. Please try again in a few minutes.',
};
export const PAYMENT_FAILURE_FALLBACK = 'the payment was not completed.';

export interface ProviderPaymentError {
  code?: string | null;
  decline_code?: string | null;
}

/** The shop's sentence for a provider's payment error; the fallback for a code not in the table. */
export function shopperPaymentMessage(error: ProviderPaymentError | null | undefined): string {
  const byDecline = error?.decline_code ? PAYMENT_FAILURE_SENTENCES[error.decline_code] : undefined;
  const byCode = error?.code ? PAYMENT_FAILURE_SENTENCES[error.code] : undefined;
  return byDecline ?? byCode ?? PAYMENT_FAILURE_FALLBACK;
}

/** A short staff-only line naming what the provider reported, for the order's history. */
export function providerErrorDetail(error: (ProviderPaymentError & { message?: string | null }) | null | undefined, intentId?: string): string {
  const codes = [error?.code, error?.decline_code].filter(Boolean).join(' / ') || 'no code';
  return `Provider reported ${codes}${intentId ? ` on ${intentId}` : ''}${error?.message ? `: ${error.message}` : ''}`;
}
