import type { ChartData } from 'chart.js';
import { Chart } from 'react-chartjs-2';
import { HARMONIC_FLOOR_DBC, formatDbcLevel, type CaptureComparison } from '../../../shared/production/capture-check';
import { SERIES_COLOURS } from '../../components/charts';
import { shopFormat } from '../../lib/format';

/** The chart's bottom: quieter levels are drawn at it (the bench cannot read them anyway). */
const CHART_FLOOR_DBC = -100;
const clampDb = (db: number) => Math.max(CHART_FLOOR_DBC, Math.min(0, db));
const percent = (x: number) => `${shopFormat().number(x, 2)} %`;
const band = (low: number | null, high: number) => (low === null ? `at most ${formatDbcLevel(high)}` : `${formatDbcLevel(low)} to ${formatDbcLevel(high)}`);

function Result({ within }: { within: boolean | null }) {
  if (within === null) return <span className="text-ink-soft">not measured</span>;
  return within ? <strong className="text-good-700">within</strong> : <strong className="text-alarm-700">outside</strong>;
}

/**
 * Measured against predicted at the reference setting: H2…H8 with their ± dB bands, THD_F with its
 * ± % band, THD_R for reference. `caption` says what is compared.
 */
export function ComparisonTable({ comparison, thdR, caption }: { comparison: CaptureComparison; thdR?: { predicted: number; measured: number | null }; caption: string }) {
  const { thd, tolerances } = comparison;
  return (
    <div className="overflow-x-auto">
      <table className="w-full min-w-[40rem] border-collapse text-left">
        <caption className="mb-2 text-left font-semibold text-spruce-900">{caption}</caption>
        <thead>
          <tr className="border-b border-spruce-700/30">
            <th scope="col" className="py-2 pr-3">Harmonic</th>
            <th scope="col" className="py-2 pr-3 text-right">Predicted</th>
            <th scope="col" className="py-2 pr-3 text-right">Measured</th>
            <th scope="col" className="py-2 pr-3">Tolerance band</th>
            <th scope="col" className="py-2">Result</th>
          </tr>
        </thead>
        <tbody className="whitespace-nowrap font-mono text-sm">
          {comparison.harmonics.map((h) => (
            <tr key={h.order} className="border-b border-spruce-700/10">
              <th scope="row" className="py-1.5 pr-3 font-sans font-semibold">H{h.order}</th>
              <td className="py-1.5 pr-3 text-right">{formatDbcLevel(h.predictedDbc)}</td>
              <td className="py-1.5 pr-3 text-right">{h.measuredDbc === null ? '—' : formatDbcLevel(h.measuredDbc)}</td>
              <td className="py-1.5 pr-3">{band(h.lowDbc, h.highDbc)}</td>
              <td className="py-1.5 font-sans"><Result within={h.within} /></td>
            </tr>
          ))}
          <tr className="border-b border-spruce-700/10">
            <th scope="row" className="py-1.5 pr-3 font-sans font-semibold">THD<sub>F</sub></th>
            <td className="py-1.5 pr-3 text-right">{percent(thd.predictedPercent)}</td>
            <td className="py-1.5 pr-3 text-right">{percent(thd.measuredPercent)}</td>
            <td className="py-1.5 pr-3">{percent(thd.lowPercent)} to {percent(thd.highPercent)} (±{tolerances.thdPercent} %)</td>
            <td className="py-1.5 font-sans"><Result within={thd.within} /></td>
          </tr>
          {thdR ? (
            <tr>
              <th scope="row" className="py-1.5 pr-3 font-sans font-semibold">THD<sub>R</sub></th>
              <td className="py-1.5 pr-3 text-right">{percent(thdR.predicted)}</td>
              <td className="py-1.5 pr-3 text-right">{thdR.measured === null ? '—' : percent(thdR.measured)}</td>
              <td className="py-1.5 pr-3 font-sans text-ink-soft">follows THD<sub>F</sub></td>
              <td />
            </tr>
          ) : null}
        </tbody>
      </table>
      <p className="mt-1 text-sm text-ink-soft">Harmonic bands are ±{tolerances.harmonicDb} dB around the prediction; levels below {HARMONIC_FLOOR_DBC.toString().replace('-', '−')} dBc count as agreeing (the bench cannot tell them apart).</p>
    </div>
  );
}

/** Predicted bars with the tolerance band behind them and the capture's levels overlaid as markers, on a dBc scale. */
export function SpectrumOverlay({ comparison, title }: { comparison: CaptureComparison; title: string }) {
  const rows = comparison.harmonics;
  const measured = rows.some((h) => h.measuredDbc !== null);
  return (
    <figure className="max-w-3xl rounded-lg border border-spruce-700/15 bg-white p-4">
      <figcaption className="mb-2 font-semibold text-spruce-900">{title}</figcaption>
      <div className="h-72">
        <Chart
          type="bar"
          aria-label={`${title}. The table beside it lists the same levels.`}
          role="img"
          // Floating bars ([low, high]) and single markers share one chart: chart.js takes both, its types one data shape.
          data={{
            labels: rows.map((h) => `H${h.order}`),
            datasets: [
              {
                type: 'bar' as const, label: `Tolerance band (±${comparison.tolerances.harmonicDb} dB)`, grouped: false, barPercentage: 0.9, order: 3,
                data: rows.map((h) => [clampDb(h.lowDbc ?? CHART_FLOOR_DBC), clampDb(h.highDbc)] as [number, number]), backgroundColor: 'rgba(227, 165, 58, 0.35)',
              },
              {
                type: 'bar' as const, label: 'Predicted for this unit', grouped: false, barPercentage: 0.45, order: 2,
                data: rows.map((h) => [CHART_FLOOR_DBC, clampDb(h.predictedDbc)] as [number, number]), backgroundColor: SERIES_COLOURS[0],
              },
              ...(measured ? [{
                type: 'line' as const, label: 'Measured from the capture', order: 1, showLine: false, pointStyle: 'rectRot' as const, pointRadius: 8, pointHoverRadius: 9,
                data: rows.map((h) => (h.measuredDbc === null ? null : clampDb(h.measuredDbc))), backgroundColor: SERIES_COLOURS[1], borderColor: '#1c1b19', borderWidth: 1.5,
              }] : []),
            ],
          } as unknown as ChartData<'bar', [number, number][]>}
          options={{
            maintainAspectRatio: false,
            scales: {
              y: { min: CHART_FLOOR_DBC, max: 0, title: { display: true, text: 'level relative to the fundamental (dBc)' }, ticks: { stepSize: 20, callback: (v) => `${v} dBc` } },
              x: { title: { display: true, text: 'harmonic' } },
            },
            plugins: {
              tooltip: {
                callbacks: {
                  label: (c) => {
                    const raw = c.raw as number | [number, number] | null;
                    if (raw === null) return `${c.dataset.label}: not measured`;
                    return Array.isArray(raw) ? `${c.dataset.label}: ${shopFormat().number(raw[0], 1)} to ${shopFormat().number(raw[1], 1)} dBc` : `${c.dataset.label}: ${shopFormat().number(raw, 1)} dBc`;
                  },
                },
              },
            },
          }}
        />
      </div>
    </figure>
  );
}
