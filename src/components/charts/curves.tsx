import { shopFormat } from '../../lib/format';
import { LineChart, type LineSeries } from './LineChart';

/** THD_F (%) against the drive control (%), log scale; marker at the slider's setting. */
export function ThdDriveChart({ series, markerDrive, band, title = 'THD_F against drive' }: {
  series: { label: string; points: { drive: number; thdF: number }[] }[]; markerDrive?: number; title?: string;
  /** Tolerance band at one drive (P5–P95 of THD_F), drawn as a bar across the spread. */
  band?: { drive: number; p5: number; p95: number };
}) {
  const bandSeries: LineSeries[] = band ? [{ label: 'P5–P95 tolerance', colour: '#a3212b', showPoints: true, points: [{ x: band.drive * 100, y: band.p5 * 100 }, { x: band.drive * 100, y: band.p95 * 100 }] }] : [];
  return (
    <LineChart
      title={title}
      xLabel="drive control (%)"
      yLabel="THD_F (%)"
      logY
      xMin={0}
      xMax={100}
      yMin={0.001}
      markerX={markerDrive === undefined ? undefined : markerDrive * 100}
      formatY={(v) => shopFormat().number(v, v >= 1 ? 0 : v >= 0.1 ? 1 : v >= 0.01 ? 2 : 3)}
      series={[...series.map((s) => ({ label: s.label, points: s.points.map((p) => ({ x: p.drive * 100, y: Math.max(p.thdF * 100, 0.001) })) })), ...bandSeries]}
    />
  );
}

/** Static transfer curve: output volts against stage input in millivolts. */
export function TransferChart({ series, title = 'Transfer curve' }: { series: { label: string; inputV: number[]; outputV: number[] }[]; title?: string }) {
  const lines: LineSeries[] = series.map((s) => ({ label: s.label, points: s.inputV.map((x, i) => ({ x: x * 1000, y: s.outputV[i] })) }));
  return <LineChart title={title} xLabel="stage input (mV)" yLabel="output (V)" series={lines} formatY={(v) => shopFormat().number(v, 2)} />;
}

/** Forward I–V curve of devices: current in mA against forward voltage in volts. */
export function IvChart({ series, title = 'Forward I–V curve' }: { series: { label: string; points: { v: number; ma: number }[]; colour?: string; dashed?: boolean }[]; title?: string }) {
  return <LineChart title={title} xLabel="forward voltage (V)" yLabel="current (mA)" yMin={0} formatX={(v) => shopFormat().number(v, 1)} formatY={(v) => shopFormat().number(v, 0)}
    series={series.map((s) => ({ label: s.label, colour: s.colour, dashed: s.dashed, points: s.points.map((p) => ({ x: p.v, y: p.ma })) }))} />;
}
