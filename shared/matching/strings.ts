// Splitting a block of 2n readings into two strings of n (one per side) with nearly equal summed Vf.
// Heuristic with a bound: take the sorted block two by two (adjacent readings), and give each pair's
// higher reading to whichever side is currently lower. The running difference D starts at 0 and
// each step adds ±d (d = that pair's gap) against D's sign, so |D| never exceeds the largest gap d:
// the two strings' sums differ by at most the largest adjacent-pair gap, hence by at most the
// block's spread (max − min). The exact split is a partition problem (NP-hard in general).

/** Positive and negative string (indices into `sorted`, a block of 2n ascending values), e.g. [0.600, 0.601, 0.602, 0.604] → sums differ by ≤ 2 mV. */
export function splitBlock(sorted: readonly number[]): { positive: number[]; negative: number[]; differenceV: number } {
  const positive: number[] = [];
  const negative: number[] = [];
  let diff = 0; // Σ positive − Σ negative
  for (let i = 0; i + 1 < sorted.length; i += 2) {
    const gap = sorted[i + 1] - sorted[i];
    // The higher reading goes to the side that is behind (ties: positive first).
    if (diff <= 0) { positive.push(i + 1); negative.push(i); diff += gap; } else { positive.push(i); negative.push(i + 1); diff -= gap; }
  }
  return { positive, negative, differenceV: Math.abs(diff) };
}
