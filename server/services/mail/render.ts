import { readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { createFormatter, type Formatter } from '../../../shared/format';

// A tiny template language of our own, enough for receipts:
//   {{path}}                   a value, HTML-escaped in .html templates
//   {{money path}}             integer cents in the shop's currency, e.g. €189.00
//   {{date path}}              an ISO date/time as a day in the shop's time zone, e.g. 18 Dec 2026
//                              (money and dates through the one formatter, shared/format.ts)
//   {{#each path}}…{{/each}}   repeat for each item; inside, paths are the item's fields
//   {{#if path}}…{{else}}…{{/if}}
//   {{> name}}                 the partial templates/mail/_name.html (or .txt), e.g. the order's lines
// Unknown paths render empty, so a missing optional field never breaks a mail.

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..', '..', 'templates', 'mail');

export interface RenderContext {
  currency: string;
  timeZone: string;
  /** The shop's locale; 'en-GB' when unset. */
  locale?: string | null;
  shopName: string;
  shopAddress: string;
  /** The shop's VAT id, shown under its address when set. */
  shopVatId?: string;
}

type Scope = Record<string, unknown>;

const escapeHtml = (s: string) => s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c] as string);

function lookup(scope: Scope, key: string): unknown {
  return key.split('.').reduce<unknown>((v, part) => (v && typeof v === 'object' ? (v as Scope)[part] : undefined), scope);
}

const formatters = new WeakMap<RenderContext, Formatter>();
function formatterOf(ctx: RenderContext): Formatter {
  let f = formatters.get(ctx);
  if (!f) formatters.set(ctx, (f = createFormatter(ctx)));
  return f;
}

function format(helper: string | undefined, value: unknown, ctx: RenderContext): string {
  if (value === undefined || value === null) return '';
  if (helper === 'money') return formatterOf(ctx).money(Number(value));
  if (helper === 'date') return formatterOf(ctx).date(value instanceof Date ? value : String(value));
  return String(value);
}

const BLOCK = /\{\{#(each|if) ([\w.]+)\}\}([\s\S]*?)\{\{\/\1\}\}/;

/** Renders a template string against data; `html` decides escaping. */
export function renderString(template: string, scope: Scope, ctx: RenderContext, html: boolean): string {
  let out = template;
  // Innermost-last is enough: our templates nest at most one #if inside an #each.
  for (let m = out.match(BLOCK); m; m = out.match(BLOCK)) {
    const [whole, kind, key, body] = m;
    const value = lookup(scope, key);
    let rendered = '';
    if (kind === 'each') {
      rendered = Array.isArray(value) ? value.map((item) => renderString(body, { ...scope, ...(item as Scope) }, ctx, html)).join('') : '';
    } else {
      const [yes, no = ''] = body.split('{{else}}');
      rendered = renderString(value && !(Array.isArray(value) && value.length === 0) ? yes : no, scope, ctx, html);
    }
    out = out.replace(whole, () => rendered);
  }
  return out.replace(/\{\{(?:(money|date) )?([\w.]+)\}\}/g, (_all, helper: string | undefined, key: string) => {
    const text = format(helper, lookup(scope, key), ctx);
    return html ? escapeHtml(text) : text;
  });
}

const cache = new Map<string, string>();
function load(file: string): string {
  if (!cache.has(file) || process.env.NODE_ENV === 'development') cache.set(file, readFileSync(path.join(root, file), 'utf8'));
  return cache.get(file) as string;
}

/** Loads a template with its {{> name}} partials put in place (partials do not nest). */
function loadWithPartials(file: string): string {
  const ext = path.extname(file);
  return load(file).replace(/\{\{> ([\w-]+)\}\}/g, (_all, name: string) => load(`_${name}${ext}`).replace(/^<!--[\s\S]*?-->\s*/, '').replace(/\n$/, ''));
}

export const TEMPLATES = ['welcome', 'account-exists', 'order-received', 'payment-failed', 'order-scheduled', 'unit-passed', 'order-shipped', 'order-refunded', 'password-reset'] as const;

/**
 * Renders templates/mail/<name>.txt (first line "Subject: …") and <name>.html inside the one
 * layout. Throws for an unknown template, so a typo is a failed send, not an empty mail.
 */
export function renderMail(name: string, data: Scope, ctx: RenderContext) {
  if (!(TEMPLATES as readonly string[]).includes(name)) throw new Error(`Unknown mail template "${name}"`);
  const scope = { ...data, shopName: ctx.shopName, shopAddress: ctx.shopAddress, shopVatId: ctx.shopVatId ?? '' };
  const [subjectLine, ...textLines] = loadWithPartials(`${name}.txt`).split('\n');
  const subject = renderString(subjectLine.replace(/^Subject:\s*/, ''), scope, ctx, false);
  const textBody = renderString(textLines.join('\n').trim(), scope, ctx, false);
  const htmlBody = renderString(loadWithPartials(`${name}.html`).replace(/^<!--[\s\S]*?-->\s*/, ''), scope, ctx, true);
  const text = renderString(load('layout.txt'), { ...scope, body: textBody }, ctx, false);
  const html = renderString(load('layout.html'), { ...scope, subject }, ctx, true).replace('<!-- body -->', htmlBody);
  return { subject, text, html };
}
