import { shopFormat } from '../../lib/format';
import type { OptionProfile } from './profiles';
import { dbcOf } from './profiles';

// Small SVG charts of our own for comparing options; each option keeps one colour in every chart.
export const OPTION_COLOURS = ['#1f5d47', '#b8672e', '#6b4fa0', '#2f6fa8', '#8a6d12'];
const FLOOR_DB = -60;

/** Bars of H2…H7 in dBc at the reference drive, options side by side. */
export function HarmonicBars({ profiles }: { profiles: OptionProfile[] }) {
  const orders = [2, 3, 4, 5, 6, 7];
  const width = 560;
  const height = 220;
  const left = 44;
  const bottom = 28;
  const plotH = height - bottom - 10;
  const groupW = (width - left) / orders.length;
  const usable = profiles.filter((p) => p.profile);
  const barW = Math.max(4, (groupW - 12) / Math.max(1, usable.length));
  const y = (db: number) => 10 + (Math.min(0, Math.max(FLOOR_DB, db)) / FLOOR_DB) * plotH;
  return (
    <svg viewBox={`0 0 ${width} ${height}`} role="img" aria-label="Harmonic levels H2 to H7 in dBc for each option" className="w-full">
      {[0, -20, -40, -60].map((db) => (
        <g key={db}>
          <line x1={left} x2={width} y1={y(db)} y2={y(db)} stroke="#d9e2dd" />
          <text x={left - 6} y={y(db) + 4} textAnchor="end" fontSize="11" fill="#4b5a53">{db} dBc</text>
        </g>
      ))}
      {orders.map((order, gi) => (
        <g key={order}>
          {usable.map((p, i) => {
            const db = dbcOf(p.profile!, order) ?? FLOOR_DB;
            const top = y(db);
            return (
              <rect key={p.option.id} x={left + gi * groupW + 6 + i * barW} y={top} width={barW - 2} height={Math.max(0, 10 + plotH - top)} fill={OPTION_COLOURS[profiles.indexOf(p) % OPTION_COLOURS.length]}>
                <title>{`${p.option.name}: H${order} ${shopFormat().number(db, 1)} dBc`}</title>
              </rect>
            );
          })}
          <text x={left + gi * groupW + groupW / 2} y={height - 8} textAnchor="middle" fontSize="12" fill="#1f2a24">H{order}</text>
        </g>
      ))}
    </svg>
  );
}

/** THD (%) against the drive control for each option, on a log scale, with the current drive marked. */
export function ThdCurves({ profiles, drive }: { profiles: OptionProfile[]; drive: number }) {
  const width = 560;
  const height = 220;
  const left = 44;
  const bottom = 28;
  const plotW = width - left - 10;
  const plotH = height - bottom - 10;
  const decades = [0.1, 1, 10, 100];
  const y = (percent: number) => 10 + plotH - ((Math.log10(Math.max(0.1, Math.min(100, percent))) + 1) / 3) * plotH;
  const x = (d: number) => left + d * plotW;
  return (
    <svg viewBox={`0 0 ${width} ${height}`} role="img" aria-label="THD in percent against drive for each option" className="w-full">
      {decades.map((p) => (
        <g key={p}>
          <line x1={left} x2={width - 10} y1={y(p)} y2={y(p)} stroke="#d9e2dd" />
          <text x={left - 6} y={y(p) + 4} textAnchor="end" fontSize="11" fill="#4b5a53">{p} %</text>
        </g>
      ))}
      {[0, 0.25, 0.5, 0.75, 1].map((d) => (
        <text key={d} x={x(d)} y={height - 8} textAnchor={d === 1 ? 'end' : d === 0 ? 'start' : 'middle'} fontSize="11" fill="#4b5a53">{Math.round(d * 100)} %</text>
      ))}
      <line x1={x(drive)} x2={x(drive)} y1={10} y2={10 + plotH} stroke="#b8672e" strokeDasharray="4 3" />
      {profiles.map((p, i) =>
        p.profile ? (
          <polyline key={p.option.id} fill="none" strokeWidth="2.5" stroke={OPTION_COLOURS[i % OPTION_COLOURS.length]}
            points={p.profile.sweep.map((s) => `${x(s.drive)},${y(s.thdF * 100)}`).join(' ')} />
        ) : null,
      )}
    </svg>
  );
}

export function Legend({ profiles }: { profiles: OptionProfile[] }) {
  return (
    <ul className="flex flex-wrap gap-4 text-sm">
      {profiles.map((p, i) => (
        <li key={p.option.id} className="flex items-center gap-2">
          <span aria-hidden className="inline-block size-3 rounded-sm" style={{ background: OPTION_COLOURS[i % OPTION_COLOURS.length] }} />
          {p.option.name}
        </li>
      ))}
    </ul>
  );
}
