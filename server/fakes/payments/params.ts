// Small readers for the decoded form params: each throws the provider-style
// 400 error naming the bad param, so the SDK raises StripeInvalidRequestError.
import { invalid, missing } from './errors.js';
import type { FormObject, FormValue } from './form.js';
import type { Metadata } from './store.js';

export function optString(p: FormObject, name: string): string | null {
  const v = p[name];
  if (v === undefined || v === '') return null;
  if (typeof v !== 'string') throw invalid(name, `Invalid string: ${name}`);
  return v;
}

export function reqString(p: FormObject, name: string): string {
  const v = optString(p, name);
  if (v === null) throw missing(name);
  return v;
}

export function optInt(p: FormObject, name: string, min = 0): number | null {
  const v = optString(p, name);
  if (v === null) return null;
  if (!/^-?\d+$/.test(v) || Number(v) < min) throw invalid(name, `Invalid integer: ${v}`);
  return Number(v);
}

export function optObject(p: FormObject, name: string): FormObject | null {
  const v = p[name];
  if (v === undefined || v === '') return null;
  if (typeof v !== 'object' || Array.isArray(v)) throw invalid(name, `Invalid object: ${name}`);
  return v;
}

export function optUrl(p: FormObject, name: string): string | null {
  const v = optString(p, name);
  if (v === null) return null;
  // Leave {CHECKOUT_SESSION_ID} alone: it is filled in at redirect time.
  let ok = false;
  try {
    ok = ['http:', 'https:'].includes(new URL(v.replaceAll('{CHECKOUT_SESSION_ID}', 'x')).protocol);
  } catch {
    ok = false;
  }
  if (!ok) throw invalid(name, `Not a valid URL: ${name}`);
  return v;
}

export function metadata(value: FormValue | undefined, name = 'metadata'): Metadata {
  if (value === undefined || value === '') return {};
  if (typeof value !== 'object' || Array.isArray(value)) throw invalid(name, `Invalid object: ${name}`);
  const out: Metadata = {};
  for (const [k, v] of Object.entries(value)) {
    if (typeof v !== 'string') throw invalid(`${name}[${k}]`, 'Metadata values must be strings.');
    // The SDK sends an empty string to unset a key.
    if (v !== '') out[k] = v;
  }
  if (Object.keys(out).length > 50) throw invalid(name, 'Metadata can have at most 50 keys.');
  return out;
}

export function expandList(p: FormObject): string[] {
  const v = p.expand;
  if (v === undefined) return [];
  const list = Array.isArray(v) ? v : [v];
  return list.filter((x): x is string => typeof x === 'string');
}
