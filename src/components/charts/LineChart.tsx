import { Line } from 'react-chartjs-2';
import { shopFormat } from '../../lib/format';
import { ChartFigure } from './ChartFigure';
import { SERIES_COLOURS } from './setup';

export interface LineSeries {
  label: string;
  points: { x: number; y: number }[];
  dashed?: boolean;
  /** Fill to the previous series (tolerance bands). */
  fillToPrevious?: boolean;
  hidden?: boolean;
  colour?: string;
  /** Draw the points as dashes (short series such as a tolerance bar). */
  showPoints?: boolean;
}

interface Props {
  title: string;
  series: LineSeries[];
  xLabel: string;
  yLabel: string;
  logY?: boolean;
  xMin?: number;
  xMax?: number;
  yMin?: number;
  yMax?: number;
  /** A vertical marker, e.g. the drive slider's setting. */
  markerX?: number;
  formatY?: (v: number) => string;
  formatX?: (v: number) => string;
}

/** The one line chart the catalog's curves use (THD against drive, transfer curve, I–V curve). */
export function LineChart({ title, series, xLabel, yLabel, logY, xMin, xMax, yMin, yMax, markerX, formatY, formatX }: Props) {
  const all = series.flatMap((s) => s.points.map((p) => p.y)).filter((v) => Number.isFinite(v));
  const markerSeries: LineSeries[] = markerX === undefined || all.length === 0 ? [] : [{
    label: 'setting', colour: '#e3a53a', dashed: true,
    points: [{ x: markerX, y: yMin ?? Math.min(...all) }, { x: markerX, y: yMax ?? Math.max(...all) }],
  }];
  const datasets = [...series, ...markerSeries].map((s, i) => {
    const colour = s.colour ?? SERIES_COLOURS[i % SERIES_COLOURS.length];
    return {
      label: s.label, data: s.points, borderColor: colour, backgroundColor: `${colour}33`, borderWidth: s.showPoints ? 4 : 2, pointRadius: s.showPoints ? 8 : 0, pointStyle: s.showPoints ? ('line' as const) : undefined,
      borderDash: s.dashed ? [6, 4] : undefined, fill: s.fillToPrevious ? '-1' : false, hidden: s.hidden, showLine: true,
    };
  });
  return (
    <ChartFigure title={title}>
      <Line
        aria-label={title}
        role="img"
        data={{ datasets }}
        options={{
          maintainAspectRatio: false,
          parsing: false,
          locale: shopFormat().locale,
          scales: {
            x: { type: 'linear', min: xMin, max: xMax, title: { display: true, text: xLabel }, ticks: formatX ? { callback: (v) => formatX(Number(v)) } : undefined },
            y: { type: logY ? 'logarithmic' : 'linear', min: yMin, max: yMax, title: { display: true, text: yLabel }, ticks: formatY ? { callback: (v) => formatY(Number(v)) } : undefined },
          },
          plugins: { legend: { labels: { filter: (item) => item.text !== 'setting' } } },
        }}
      />
    </ChartFigure>
  );
}
