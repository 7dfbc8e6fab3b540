// The verification page's HTML: small, server-rendered, in Kneepoint's colours, no scripts.
import type { VerifiedUnit } from './verify';

const escape = (s: string) => s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);

const STYLE = `
  @font-face { font-family: "Source Sans 3"; font-weight: 400; font-display: swap; src: url("/verify-fonts/regular.woff2") format("woff2"); }
  @font-face { font-family: "Source Sans 3"; font-weight: 600 700; font-display: swap; src: url("/verify-fonts/semibold.woff2") format("woff2"); }
  body { margin: 0; background: #f7f4ee; color: #1c1b19; font: 17px/1.5 "Source Sans 3", "Source Sans Pro", system-ui, sans-serif; }
  header { background: #1e2a26; color: #fff; padding: 18px 24px; }
  header p { margin: 0; color: #c9d6cf; font-size: 15px; }
  header h1 { margin: 0; font-size: 22px; }
  main { max-width: 560px; margin: 28px auto; padding: 0 20px; }
  .serial { font-family: "DejaVu Sans Mono", ui-monospace, monospace; color: #8f3f1c; font-size: 20px; }
  dl { display: grid; grid-template-columns: max-content 1fr; gap: 8px 20px; background: #fff; border: 1px solid #c9d6cf; border-radius: 10px; padding: 18px 20px; }
  dt { color: #4a4740; } dd { margin: 0; font-weight: 600; }
  .verdict { display: inline-block; padding: 2px 10px; border-radius: 6px; }
  @media (max-width: 420px) { dl { grid-template-columns: 1fr; gap: 2px; } dd { margin-bottom: 10px; } }
  .ok { background: #ddf0e1; color: #2d6a3e; } .open { background: #f6e3d6; color: #8f3f1c; }
  footer { color: #4a4740; font-size: 14px; margin-top: 18px; }
`;

function page(title: string, shop: string, body: string) {
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">
<meta name="robots" content="noindex"><title>${escape(title)}</title><style>${STYLE}</style></head>
<body><header><h1>${escape(shop)}</h1><p>Unit check</p></header><main>${body}</main></body></html>`;
}

/** The page for a known serial: model, option, build month, verdict, and nothing about its owner. */
export function verifiedPage(shop: string, unit: VerifiedUnit) {
  return page(`Unit ${unit.serial} — ${shop}`, shop, `
  <h2>This is a genuine ${escape(shop)} unit</h2>
  <p class="serial">${escape(unit.serial)}</p>
  <dl>
    <dt>Model</dt><dd>${escape(unit.model)}</dd>
    <dt>Clipping option</dt><dd>${escape(unit.option)}</dd>
    <dt>Built</dt><dd>${unit.builtMonth ? escape(unit.builtMonth) : 'Not built yet'}</dd>
    <dt>Bench test</dt><dd><span class="verdict ${unit.passed ? 'ok' : 'open'}">${escape(unit.verdict)}</span></dd>
  </dl>
  <footer>The serial number on the unit's base plate and on its spec sheet should match the one above.</footer>`);
}

/** A plain "not found" for a serial the shop never made (answered with 404). */
export function unknownSerialPage(shop: string, serial: string) {
  return page(`Serial not found — ${shop}`, shop, `
  <h2>Serial not found</h2>
  <p>${escape(shop)} cannot confirm a unit with the serial number <span class="serial">${escape(serial.slice(0, 60))}</span>.</p>
  <footer>Open the link (or scan the code) printed on the unit's spec sheet: it carries the serial and the unit's check code.</footer>`);
}

export function tooManyChecksPage(shop: string) {
  return page(`Too many checks — ${shop}`, shop, '<h2>Too many checks</h2><p>Please wait a minute and try again.</p>');
}
