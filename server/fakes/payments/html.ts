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
  fieldset { border: 0; margin: 0; padding: 0; }
  legend { font-weight: 600; margin-bottom: .4rem; }
  label.choice { display: flex; gap: .6rem; align-items: flex-start; border: 1px solid #ccc; border-radius: 8px;
                 padding: .6rem .75rem; margin-top: .5rem; cursor: pointer; min-height: 44px; box-sizing: border-box; }
  label.choice:has(input:checked) { border-color: #2d5a3d; background: #eef5f0; }
  label.choice input { margin-top: .25rem; }
  label.choice small { display: block; color: #555; font-size: .82rem; }
  button { margin-top: 1.1rem; width: 100%; padding: .7rem; font-size: 1rem; border: 0;
           border-radius: 6px; background: #2d5a3d; color: #fff; cursor: pointer; }
  button.secondary { background: #8a2d2d; }
  .error { background: #fde8e8; border: 1px solid #d99; color: #7a1f1f; border-radius: 6px;
           padding: .6rem .75rem; margin: .75rem 0; }
  .hint { font-size: .8rem; color: #555; margin-top: 1rem; }
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

// The three outcomes the payer can pick, in the page's words (values are the control API's).
const CHOICES: { value: string; title: string; detail: string }[] = [
  { value: 'succeeds', title: 'The payment goes through', detail: 'You return to the shop with the order paid.' },
  { value: 'declined', title: 'The payment is turned down', detail: 'Nothing is charged; the page stays open for another try.' },
  { value: 'needs-confirmation', title: 'The payer must confirm first', detail: 'A second page asks the payer to confirm or refuse.' },
];

export function outcomeForm(s: Session, error?: string, chosen = 'succeeds'): string {
  const err = error ? `<div class="error" role="alert">${esc(error)}</div>` : '';
  const choices = CHOICES.map((c) => `
  <label class="choice"><input type="radio" name="outcome" value="${c.value}"${c.value === chosen ? ' checked' : ''}>
    <span>${esc(c.title)}<small>${esc(c.detail)}</small></span></label>`).join('');
  return layout('Test payment', `
<h1>Pay for your order</h1>
${summary(s)}
${err}
<form method="post" action="/pay/${esc(s.id)}">
  <fieldset><legend>What should happen to this test payment?</legend>${choices}
  </fieldset>
  <button type="submit">Pay ${esc(formatMoney(s.amount_total, s.currency))}</button>
</form>
${cancelLink(s)}
<p class="hint">No card details are asked for: the payments fake only plays out the outcome you pick.</p>`);
}

export function confirmPage(s: Session): string {
  return layout('Confirm the payment', `
<h1>One more step</h1>
<p>Before <strong>${esc(formatMoney(s.amount_total, s.currency))}</strong> is taken, the payer is asked to
say yes to this payment. In the fake, you answer for them.</p>
<form method="post" action="/pay/${esc(s.id)}/confirm">
  <button type="submit" name="answer" value="yes">Yes, take the payment</button>
  <button type="submit" name="answer" value="no" class="secondary">No, stop this payment</button>
</form>`);
}

export function notice(title: string, message: string, link?: { href: string; text: string }): string {
  const a = link ? `<a class="cancel" href="${esc(link.href)}">${esc(link.text)}</a>` : '';
  return layout(title, `<h1>${esc(title)}</h1><p>${esc(message)}</p>${a}`);
}
