// HTML for the hosted test-payment page. Plain server-rendered forms with no
// scripts, so it works with a bare HTTP POST in tests as well as in a browser.
import type { Session } from './store.js';

export function esc(s: string): string {
  return s.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);
}

export function formatMoney(minor: number, currency: string): string {
  const fmt = new Intl.NumberFormat('en', { style: 'currency', currency: currency.toUpperCase() });
  const digits = fmt.resolvedOptions().maximumFractionDigits ?? 2;
  return fmt.format(minor / 10 ** digits);
}

const STYLE = `
  body { font-family: system-ui, sans-serif; background: #f3f1ec; color: #222; margin: 0; }
  main { max-width: 26rem; margin: 2.5rem auto; background: #fff; border-radius: 10px;
         padding: 1.5rem 1.75rem; box-shadow: 0 1px 4px rgba(0,0,0,.12); }
  .banner { background: #fff4d6; border: 1px solid #e5c56a; border-radius: 6px; padding: .5rem .75rem;
            font-size: .85rem; margin-bottom: 1rem; }
  h1 { font-size: 1.2rem; margin: 0 0 .75rem; }
  table { width: 100%; border-collapse: collapse; font-size: .95rem; margin-bottom: 1rem; }
  td { padding: .25rem 0; } td.num { text-align: right; }
  tr.total td { border-top: 1px solid #ddd; font-weight: 600; padding-top: .5rem; }
  label { display: block; font-size: .85rem; margin: .75rem 0 .25rem; }
  input { width: 100%; box-sizing: border-box; padding: .55rem; font-size: 1rem;
          border: 1px solid #bbb; border-radius: 6px; }
  .row { display: flex; gap: .75rem; } .row > div { flex: 1; }
  button { margin-top: 1.1rem; width: 100%; padding: .7rem; font-size: 1rem; border: 0;
           border-radius: 6px; background: #2d5a3d; color: #fff; cursor: pointer; }
  button.secondary { background: #8a2d2d; }
  .error { background: #fde8e8; border: 1px solid #d99; color: #7a1f1f; border-radius: 6px;
           padding: .6rem .75rem; margin: .75rem 0; }
  .hint { font-size: .8rem; color: #555; margin-top: 1rem; }
  .hint code { background: #f0f0f0; padding: 0 .2rem; }
  a.cancel { display: block; text-align: center; margin-top: .9rem; color: #555; font-size: .9rem; }
`;

export function layout(title: string, body: string): string {
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>${esc(title)}</title><style>${STYLE}</style></head>
<body><main>
<div class="banner">Local test payment page of the payments fake. No real card is charged.</div>
${body}
</main></body></html>`;
}

function summary(s: Session): string {
  const rows = s._lineItems
    .map((it) => `<tr><td>${esc(it.description)} × ${it.quantity}</td>` +
      `<td class="num">${esc(formatMoney(it.amount_total, it.currency))}</td></tr>`)
    .join('');
  return `<table>${rows}<tr class="total"><td>Total</td>` +
    `<td class="num">${esc(formatMoney(s.amount_total, s.currency))}</td></tr></table>`;
}

function cancelLink(s: Session): string {
  return s.cancel_url ? `<a class="cancel" href="${esc(s.cancel_url)}">Cancel and go back</a>` : '';
}

export function cardForm(s: Session, error?: string, values: { card?: string; expiry?: string } = {}): string {
  const err = error ? `<div class="error" role="alert">${esc(error)}</div>` : '';
  return layout('Test payment', `
<h1>Pay for your order</h1>
${summary(s)}
${err}
<form method="post" action="/pay/${esc(s.id)}">
  <label for="card-number">Card number</label>
  <input id="card-number" name="card_number" inputmode="numeric" autocomplete="cc-number"
         placeholder="4242 4242 4242 4242" value="${esc(values.card ?? '')}" required>
  <div class="row">
    <div><label for="card-expiry">Expiry (MM/YY)</label>
      <input id="card-expiry" name="expiry" placeholder="12/34" value="${esc(values.expiry ?? '')}" required></div>
    <div><label for="card-cvc">CVC</label>
      <input id="card-cvc" name="cvc" inputmode="numeric" placeholder="123" required></div>
  </div>
  <button type="submit">Pay ${esc(formatMoney(s.amount_total, s.currency))}</button>
</form>
${cancelLink(s)}
<p class="hint">Test cards: <code>4242 4242 4242 4242</code> succeeds,
<code>4000 0000 0000 0002</code> is declined, <code>4000 0027 6000 3184</code> asks for
extra authentication. Any future expiry and any 3-digit CVC.</p>`);
}

export function authPage(s: Session): string {
  return layout('Confirm payment', `
<h1>Extra authentication</h1>
<p>Your bank asks you to confirm this payment of
<strong>${esc(formatMoney(s.amount_total, s.currency))}</strong>. This step stands in for the bank's own check.</p>
<form method="post" action="/pay/${esc(s.id)}/authenticate">
  <button type="submit" name="decision" value="approve">Approve authentication</button>
  <button type="submit" name="decision" value="fail" class="secondary">Fail authentication</button>
</form>`);
}

export function notice(title: string, message: string, link?: { href: string; text: string }): string {
  const a = link ? `<a class="cancel" href="${esc(link.href)}">${esc(link.text)}</a>` : '';
  return layout(title, `<h1>${esc(title)}</h1><p>${esc(message)}</p>${a}`);
}
