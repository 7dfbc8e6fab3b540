// The payments fake's decoder for the SDK's bracket-keyed form bodies.
import { describe, expect, it } from 'vitest';
import { parseForm } from '../../server/fakes/payments/form.js';

describe('payments fake: form decoding', () => {
  it('rebuilds nested objects and arrays from bracket keys', () => {
    const body =
      'mode=payment&line_items[0][price_data][unit_amount]=1500&line_items[0][quantity]=2' +
      '&line_items[1][quantity]=1&metadata[order_id]=42&expand[0]=line_items&success_url=' +
      encodeURIComponent('http://x/ok?id={CHECKOUT_SESSION_ID}');
    expect(parseForm(body)).toEqual({
      mode: 'payment',
      line_items: [{ price_data: { unit_amount: '1500' }, quantity: '2' }, { quantity: '1' }],
      metadata: { order_id: '42' },
      expand: ['line_items'],
      success_url: 'http://x/ok?id={CHECKOUT_SESSION_ID}',
    });
  });

  it('accepts percent-encoded brackets and empty-bracket lists', () => {
    expect(parseForm('expand%5B%5D=a&expand%5B%5D=b')).toEqual({ expand: ['a', 'b'] });
  });

  it('ignores keys that would reach the object prototype', () => {
    const out = parseForm('__proto__[polluted]=1&metadata[constructor]=x&ok=1');
    expect(out).toEqual({ ok: '1' });
    expect(({} as Record<string, unknown>).polluted).toBeUndefined();
  });
});
