import type { ReactNode } from 'react';

/** The card every chart here sits in: its title as the caption, the chart 16 rem high below it. */
export function ChartFigure({ title, children }: { title: string; children: ReactNode }) {
  return (
    <figure className="rounded-lg bg-white p-4 shadow-sm">
      <figcaption className="mb-2 font-semibold text-spruce-900">{title}</figcaption>
      <div className="h-64">{children}</div>
    </figure>
  );
}
