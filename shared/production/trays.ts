// Trays of measured clipping devices: slot labels, the tray's distribution and its outlier flags.
// Pure, so the tray screen recomputes the same flags while readings are typed.
import { isVfOutOfRange, vfRange } from './forward-voltage';

/** Most slots on one tray. */
export const TRAY_MAX_SLOTS = 500;
/**
 * A tray whose median Vf is further than this fraction of the device model's nominal Vf from it is
 * called out as a possibly wrong or substituted part (shop rule, invented: 8 % is ≈ 47 mV for a
 * 0.585 V silicon diode, ≈ 130 mV for a 1.65 V red LED — more than lot-to-lot spread, less than
 * the gap to a neighbouring device kind).
 */
export const TRAY_SHIFT_FRACTION = 0.08;
/** A reading further than this many robust σ from the tray's median is flagged against the tray's own distribution. */
export const TRAY_OUTLIER_SIGMAS = 3.5;
/** Bars of the tray's histogram. */
export const TRAY_HISTOGRAM_BINS = 12;

/** The label a slot goes by on kit lists and checklists, e.g. slotLabel(3, 7) = "T3-07". */
export const slotLabel = (trayId: number, slot: number) => `T${trayId}-${String(slot).padStart(2, '0')}`;

export interface SlotReading { slot: number; vf: number }
export type OutlierReason = 'range' | 'distribution';
export interface TrayStats {
  count: number;
  meanV: number | null;
  sigmaV: number | null;
  medianV: number | null;
  minV: number | null;
  maxV: number | null;
  histogram: { fromV: number; toV: number; count: number }[];
  outliers: { slot: number; vf: number; reasons: OutlierReason[] }[];
  /** The tray's median against the device model's nominal Vf; `shifted` calls out a possibly wrong part. */
  nominal: { vf: number; offsetV: number | null; limitV: number; shifted: boolean };
  range: { min: number; max: number };
}

const median = (sorted: readonly number[]) => {
  const n = sorted.length;
  return n % 2 ? sorted[(n - 1) / 2] : (sorted[n / 2 - 1] + sorted[n / 2]) / 2;
};

/**
 * Mean, σ (sample), histogram and flags of a tray's readings, e.g. 40 readings around 0.60 V with one
 * at 0.72 V on a silicon tray → that slot flagged 'distribution'. The distribution flag uses the
 * median and 1.4826 × the median absolute deviation (a robust σ for normal data), so one bad part
 * does not hide itself by widening σ.
 */
export function trayStats(readings: readonly SlotReading[], kind: string, nominalVf: number): TrayStats {
  const range = vfRange(kind);
  const limitV = TRAY_SHIFT_FRACTION * nominalVf;
  const vfs = readings.map((r) => r.vf).sort((a, b) => a - b);
  const n = vfs.length;
  if (!n) {
    return { count: 0, meanV: null, sigmaV: null, medianV: null, minV: null, maxV: null, histogram: [], outliers: [], nominal: { vf: nominalVf, offsetV: null, limitV, shifted: false }, range };
  }
  const mean = vfs.reduce((a, b) => a + b, 0) / n;
  const sigma = n > 1 ? Math.sqrt(vfs.reduce((a, v) => a + (v - mean) ** 2, 0) / (n - 1)) : 0;
  const med = median(vfs);
  const robust = 1.4826 * median(vfs.map((v) => Math.abs(v - med)).sort((a, b) => a - b));
  // A tray of nearly identical parts would flag any wobble: never call a reading out for less than 2 mV.
  const band = Math.max(TRAY_OUTLIER_SIGMAS * robust, 0.002);
  const outliers = readings.flatMap((r) => {
    const reasons: OutlierReason[] = [];
    if (isVfOutOfRange(kind, r.vf)) reasons.push('range');
    if (n >= 5 && Math.abs(r.vf - med) > band) reasons.push('distribution');
    return reasons.length ? [{ slot: r.slot, vf: r.vf, reasons }] : [];
  }).sort((a, b) => a.slot - b.slot);
  const lo = vfs[0];
  const hi = vfs[n - 1];
  const bins = hi > lo ? TRAY_HISTOGRAM_BINS : 1;
  const width = hi > lo ? (hi - lo) / bins : 0;
  const histogram = Array.from({ length: bins }, (_, i) => ({ fromV: lo + i * width, toV: i === bins - 1 ? hi : lo + (i + 1) * width, count: 0 }));
  for (const v of vfs) histogram[width ? Math.min(bins - 1, Math.floor((v - lo) / width)) : 0].count++;
  const offsetV = med - nominalVf;
  return {
    count: n, meanV: mean, sigmaV: sigma, medianV: med, minV: lo, maxV: hi, histogram, outliers,
    nominal: { vf: nominalVf, offsetV, limitV, shifted: Math.abs(offsetV) > limitV }, range,
  };
}

/**
 * Readings from pasted text or a meter's CSV: one reading per line, optionally "slot, reading".
 * A header line (letters) is skipped; readings in mV (a unit "mV", or a number above 10) become volts.
 * Slots run on from `firstSlot` where a line has no slot. Problems name the line, e.g. "line 4: no number".
 */
export function parseReadings(text: string, firstSlot = 1): { readings: SlotReading[]; problems: string[] } {
  const readings: SlotReading[] = [];
  const problems: string[] = [];
  let next = firstSlot;
  const lines = text.split(/\r\n|\r|\n/);
  let inMillivolts = false;
  lines.forEach((raw, i) => {
    const line = raw.trim();
    if (!line) return;
    const cells = line.split(/[,;\t]/).map((c) => c.trim()).filter((c) => c !== '');
    const numeric = cells.map((c) => /^[+-]?(\d+([.,]\d*)?|[.,]\d+)(\s*m?V)?$/i.test(c));
    if (i === 0 && !numeric.some(Boolean)) {
      // A header: note a millivolt column, e.g. "slot,Vf (mV)".
      inMillivolts = /mv/i.test(line);
      return;
    }
    const read = (c: string) => {
      const mv = inMillivolts || /mv$/i.test(c);
      const v = Number(c.replace(/\s*m?V$/i, '').replace(',', '.'));
      return mv || v > 10 ? v / 1000 : v;
    };
    let slot = next;
    let vfCell: string | undefined;
    if (cells.length >= 2 && numeric[0] && numeric[1] && /^\d+$/.test(cells[0]) && !/[.,]/.test(cells[0])) {
      slot = Number(cells[0]);
      vfCell = cells[1];
    } else vfCell = cells.find((_, j) => numeric[j]);
    if (vfCell === undefined) { problems.push(`line ${i + 1}: no reading in “${line.slice(0, 40)}”`); return; }
    const vf = read(vfCell);
    if (!(vf > 0 && vf <= 10)) { problems.push(`line ${i + 1}: ${vfCell} is not a forward voltage between 0 and 10 V`); return; }
    if (!(slot >= 1 && slot <= TRAY_MAX_SLOTS)) { problems.push(`line ${i + 1}: slot ${slot} is outside 1–${TRAY_MAX_SLOTS}`); return; }
    readings.push({ slot, vf: Math.round(vf * 1e6) / 1e6 });
    next = slot + 1;
  });
  const seen = new Map<number, number>();
  readings.forEach((r) => seen.set(r.slot, (seen.get(r.slot) ?? 0) + 1));
  for (const [slot, times] of seen) if (times > 1) problems.push(`slot ${slot} appears ${times} times`);
  return { readings, problems };
}
