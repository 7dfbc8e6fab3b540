import type { ReactNode } from 'react';

/**
 * A serial or order number (HM-SMD-2612-0007, K-2612-0042): kept on one line, never broken at
 * its hyphens, in figures of equal width. Use it wherever one is shown among other words.
 */
export function Ident({ children, mono = false }: { children: ReactNode; mono?: boolean }) {
  return <span className={`ident${mono ? ' font-mono' : ''}`}>{children}</span>;
}
