// Decodes the form-encoded bodies (and query strings) the payments SDK sends.
// The SDK flattens nested params into bracket keys, e.g.
//   line_items[0][price_data][unit_amount]=1500&metadata[order]=42&expand[0]=payment_intent
// and we turn them back into plain objects and arrays. Values stay strings;
// the API layer converts the few numbers it needs.

export type FormValue = string | FormValue[] | { [key: string]: FormValue };
export type FormObject = { [key: string]: FormValue };

// Keys that could reach Object.prototype if assigned naively.
const FORBIDDEN = new Set(['__proto__', 'constructor', 'prototype']);

function splitKey(key: string): string[] {
  // "a[b][0]" → ["a", "b", "0"]; a key without brackets is a single part.
  const first = key.indexOf('[');
  if (first <= 0) return [key];
  const parts = [key.slice(0, first)];
  const rest = key.slice(first);
  for (const m of rest.matchAll(/\[([^\]]*)\]/g)) parts.push(m[1]);
  return parts;
}

// Objects whose keys are all 0..n-1 become arrays, as the SDK encoded them.
function arraysFromIndexedObjects(value: FormValue): FormValue {
  if (typeof value === 'string' || Array.isArray(value)) return value;
  const keys = Object.keys(value);
  for (const k of keys) value[k] = arraysFromIndexedObjects(value[k]);
  const indexed = keys.length > 0 && keys.every((k) => /^\d+$/.test(k));
  if (!indexed) return value;
  return keys
    .map(Number)
    .sort((a, b) => a - b)
    .map((i) => value[String(i)]);
}

export function parseForm(body: string): FormObject {
  const root: FormObject = {};
  for (const [rawKey, val] of new URLSearchParams(body)) {
    const parts = splitKey(rawKey);
    if (parts.some((p) => FORBIDDEN.has(p))) continue;
    let node: FormObject = root;
    parts.forEach((part, i) => {
      const last = i === parts.length - 1;
      // "expand[]" style (empty brackets) appends to the list.
      const key = part === '' ? String(Object.keys(node).length) : part;
      if (last) {
        node[key] = val;
        return;
      }
      const next = node[key];
      if (typeof next !== 'object' || next === null || Array.isArray(next)) node[key] = {};
      node = node[key] as FormObject;
    });
  }
  return arraysFromIndexedObjects(root) as FormObject;
}
