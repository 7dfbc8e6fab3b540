/** Harmonic levels as bars (dBc, H2 upward), measured beside predicted, so the two can be compared at a glance. */
export function HarmonicBars({ measured, predicted }: { measured: { order: number; dbc: number }[]; predicted?: { order: number; dbc: number }[] }) {
  const floor = -80;
  const orders = measured.filter((h) => h.order >= 2 && h.order <= 7);
  const height = (dbc: number) => Math.max(0, Math.min(1, (dbc - floor) / -floor)) * 100;
  return (
    <figure>
      <svg viewBox="0 0 320 130" className="w-full max-w-md" role="img" aria-label="Harmonic levels in dBc, measured and predicted">
        {orders.map((h, i) => {
          const p = predicted?.find((x) => x.order === h.order);
          const x = 10 + i * 52;
          return (
            <g key={h.order}>
              <rect x={x} y={110 - height(h.dbc)} width={18} height={height(h.dbc)} className="fill-copper-600" />
              {p ? <rect x={x + 20} y={110 - height(p.dbc)} width={18} height={height(p.dbc)} className="fill-spruce-700" /> : null}
              <text x={x + 19} y={125} textAnchor="middle" fontSize="10">H{h.order}</text>
            </g>
          );
        })}
      </svg>
      <figcaption className="text-sm text-ink-soft">Copper: measured capture · green: predicted for this unit · scale 0 to −80 dBc</figcaption>
    </figure>
  );
}
