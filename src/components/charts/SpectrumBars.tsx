import { Bar } from 'react-chartjs-2';
import { shopFormat } from '../../lib/format';
import { ChartFigure } from './ChartFigure';
import { SERIES_COLOURS } from './setup';

export interface SpectrumSeries {
  label: string;
  /** dBc of H2, H3, … in order. */
  dbc: number[];
}

/** Harmonic levels relative to the fundamental (dBc), one bar group per harmonic, one colour per series. */
export function SpectrumBars({ series, floorDbc = -100, title }: { series: SpectrumSeries[]; floorDbc?: number; title: string }) {
  const orders = Math.max(0, ...series.map((s) => s.dbc.length));
  return (
    <ChartFigure title={title}>
      <Bar
        aria-label={title}
        role="img"
        data={{
          labels: Array.from({ length: orders }, (_, i) => `H${i + 2}`),
          datasets: series.map((s, i) => ({
            label: s.label,
            // Bars grow up from the floor so a quieter harmonic is a shorter bar.
            data: s.dbc.map((v) => Math.max(v, floorDbc) - floorDbc),
            backgroundColor: SERIES_COLOURS[i % SERIES_COLOURS.length],
          })),
        }}
        options={{
          maintainAspectRatio: false,
          locale: shopFormat().locale,
          scales: {
            y: { min: 0, max: -floorDbc, title: { display: true, text: 'level (dBc)' }, ticks: { callback: (v) => shopFormat().number(Number(v) + floorDbc, 0) } },
            x: { title: { display: true, text: 'harmonic' } },
          },
          plugins: { tooltip: { callbacks: { label: (c) => `${c.dataset.label}: ${shopFormat().number(Number(c.raw) + floorDbc, 1)} dBc` } } },
        }}
      />
    </ChartFigure>
  );
}
