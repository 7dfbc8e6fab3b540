// What a designed candidate adds to the bill of materials, what it costs, and the surcharge the
// designer suggests for it. Pure functions: the design screen and its tests call them.

/** A library device as the costing needs it: its linked part, if any. */
export interface CostedDevice { name: string; partId?: number | null; partNumber: string | null; unitCostCents: number | null }
/** A stocked capacitor part and the capacitance read from its value text. */
export interface CapacitorPart { partId: number; partNumber: string; farads: number; unitCostCents: number }

export interface BomDeltaLine { partNumber: string; quantity: number; unitCostCents: number }
export interface CandidateBom { lines: BomDeltaLine[]; cents: number; unlinked: string[] }

const PREFIX = { p: 1e-12, n: 1e-9, u: 1e-6, 'µ': 1e-6 } as const;

/** Capacitance from a part's value text, e.g. "47 nF film 63 V" → 4.7e-8, "1 µF" → 1e-6; null when not a capacitance. */
export function capacitanceFromValue(value: string): number | null {
  const m = /^\s*(\d+(?:\.\d+)?)\s*([pnuµ])F\b/.exec(value);
  if (!m) return null;
  const f = Number(m[1]) * PREFIX[m[2] as keyof typeof PREFIX];
  // Rounded to 12 significant digits so 4.7 × 1e-9 reads as 4.7e-9.
  return Number(f.toPrecision(12));
}

/**
 * The parts a candidate adds: its devices' linked parts (one per device in each string) and, with a
 * capacitor across the devices, that capacitor's part. Devices without a linked part are named in `unlinked`.
 */
export function candidateBom(
  strings: { positive: { device: number; count: number } | null; negative: { device: number; count: number } | null },
  devices: CostedDevice[], capacitor: CapacitorPart | null,
): CandidateBom {
  const byPart = new Map<string, BomDeltaLine>();
  const unlinked: string[] = [];
  for (const s of [strings.positive, strings.negative]) {
    if (!s) continue;
    const d = devices[s.device];
    if (d.partId == null || d.partNumber === null || d.unitCostCents === null) {
      if (!unlinked.includes(d.name)) unlinked.push(d.name);
      continue;
    }
    const line = byPart.get(d.partNumber) ?? { partNumber: d.partNumber, quantity: 0, unitCostCents: d.unitCostCents };
    line.quantity += s.count;
    byPart.set(d.partNumber, line);
  }
  if (capacitor) byPart.set(capacitor.partNumber, { partNumber: capacitor.partNumber, quantity: 1, unitCostCents: capacitor.unitCostCents });
  const lines = [...byPart.values()];
  return { lines, cents: lines.reduce((a, l) => a + l.quantity * l.unitCostCents, 0), unlinked };
}

/** Suggested surcharges are rounded up to this many cents. */
export const SURCHARGE_STEP_CENTS = 50;

/**
 * The suggested surcharge keeps the model's own margin on what the candidate costs beyond the cheapest
 * existing option: (candidate parts − cheapest option's device parts) × (base price ÷ unit cost), never
 * below zero, rounded up to SURCHARGE_STEP_CENTS. E.g. 40 ¢ more at 199.00 on a 50.00 cost → 1.60 → 2.00.
 * Without a known unit cost the extra parts cost is passed on as it is (ratio 1).
 */
export function suggestedSurchargeCents(candidateCents: number, cheapestOptionCents: number, basePriceCents: number, unitCostCents: number | null): number {
  const extra = Math.max(0, candidateCents - cheapestOptionCents);
  const ratio = unitCostCents && unitCostCents > 0 ? basePriceCents / unitCostCents : 1;
  return Math.max(0, Math.ceil((extra * ratio) / SURCHARGE_STEP_CENTS - 1e-9) * SURCHARGE_STEP_CENTS);
}
