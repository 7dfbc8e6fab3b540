import { useSyncExternalStore } from 'react';

// The cart lives in this browser only (localStorage): it holds what was chosen, never a price.
// Every amount shown comes from the server's quote.

export interface CartLine {
  modelId: number;
  optionId: number;
  quantity: number;
  /** For showing the line before the quote arrives. */
  label: string;
}

const KEY = 'kneepoint.cart.v1';
const listeners = new Set<() => void>();
let cached: { raw: string | null; lines: CartLine[] } = { raw: null, lines: [] };

function read(): CartLine[] {
  const raw = typeof localStorage === 'undefined' ? null : localStorage.getItem(KEY);
  if (raw === cached.raw) return cached.lines;
  let lines: CartLine[] = [];
  try {
    lines = raw ? (JSON.parse(raw) as CartLine[]).filter((l) => l && Number.isInteger(l.modelId) && Number.isInteger(l.optionId)) : [];
  } catch {
    lines = [];
  }
  cached = { raw, lines };
  return lines;
}

function write(lines: CartLine[]) {
  localStorage.setItem(KEY, JSON.stringify(lines));
  listeners.forEach((l) => l());
}

const subscribe = (listener: () => void) => {
  listeners.add(listener);
  window.addEventListener('storage', listener);
  return () => {
    listeners.delete(listener);
    window.removeEventListener('storage', listener);
  };
};

export const MAX_PER_LINE = 20;

export const cart = {
  add(line: CartLine) {
    const lines = read();
    const same = lines.find((l) => l.modelId === line.modelId && l.optionId === line.optionId);
    if (same) write(lines.map((l) => (l === same ? { ...l, quantity: Math.min(MAX_PER_LINE, l.quantity + line.quantity) } : l)));
    else write([...lines, line]);
  },
  setQuantity(optionId: number, quantity: number) {
    write(read().map((l) => (l.optionId === optionId ? { ...l, quantity: Math.max(1, Math.min(MAX_PER_LINE, quantity)) } : l)));
  },
  remove(optionId: number) {
    write(read().filter((l) => l.optionId !== optionId));
  },
  clear() {
    write([]);
  },
};

export const useCart = () => useSyncExternalStore(subscribe, read, () => []);
