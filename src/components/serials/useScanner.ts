import { useEffect, useRef } from 'react';

/**
 * A pause longer than this between keystrokes starts a new entry. A scanner types a whole label
 * in a few tens of milliseconds; the generous limit keeps a slow tablet (or a person typing on
 * the page) from splitting one serial in two.
 */
export const PAUSE_MS = 1000;
const MIN_LENGTH = 4;

/**
 * Hands over what a barcode scanner "types" anywhere on the page: a run of keystrokes ending with
 * Enter. Keys typed into another field are left alone, so a scan never lands in a form the user
 * is filling in.
 */
export function useScanner(onScan: (text: string) => void) {
  const latest = useRef(onScan);
  useEffect(() => { latest.current = onScan; });
  useEffect(() => {
    let buffer = '';
    let last = 0;
    const onKey = (e: KeyboardEvent) => {
      const target = e.target as HTMLElement | null;
      if (target && (target.isContentEditable || ['INPUT', 'TEXTAREA', 'SELECT'].includes(target.tagName))) return;
      const now = performance.now();
      if (now - last > PAUSE_MS) buffer = '';
      last = now;
      if (e.key === 'Enter') {
        if (buffer.length >= MIN_LENGTH) {
          e.preventDefault();
          latest.current(buffer);
        }
        buffer = '';
      } else if (e.key.length === 1 && !e.ctrlKey && !e.metaKey && !e.altKey) {
        buffer += e.key;
      }
    };
    window.addEventListener('keydown', onKey);
    return () => window.removeEventListener('keydown', onKey);
  }, []);
}
