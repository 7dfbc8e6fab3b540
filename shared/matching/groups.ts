// Exact choice of disjoint groups of consecutive readings (sorted by Vf): the one owner of "which
// devices go together" for symmetric options, the checking CLI (`npm run --silent match`) and trays.
//
// Why consecutive groups are enough for pairs (size 2): take any K disjoint pairs and two of them,
// a ≤ b ≤ c ≤ d in sorted order. Crossing (a,c)+(b,d) or nesting (a,d)+(b,c) costs at least
// (b−a)+(d−c) in total and at least max(b−a, d−c) in the worst pair, so swapping partners to
// (a,b)+(c,d) never makes the total, the worst pair or any pair's cap worse; and a pair that skips
// over an unused reading can take that neighbour instead for no more. Repeating this leaves pairs
// that are adjacent in sorted order, so the dynamic programme over adjacent pairs below is exact for
// "sum", for "max" (bottleneck, then total) and under a cap on each pair (maxDeltaMv).
// For bigger groups (strings) the same programme picks K blocks of consecutive readings with the
// smallest total spread; that choice is a heuristic (see splitBlock in strings.ts for its bound).

/** How groups are judged: the total spread, or the worst spread first and then the total. */
export type MatchObjective = 'sum' | 'max';

export interface GroupChoice {
  /** Start indices (into the sorted values) of each chosen block of `size` consecutive values. */
  starts: number[];
}

/**
 * Most blocks (up to `count`) of `size` consecutive sorted values with each block's spread ≤ cap,
 * then the smallest total spread for that number of blocks. O(n · count).
 * e.g. consecutiveBlocks([0.600, 0.601, 0.610, 0.612], 2, 2) → starts [0, 2].
 */
export function consecutiveBlocks(sorted: readonly number[], size: number, count: number, cap = Infinity): GroupChoice {
  const n = sorted.length;
  const k = Math.min(count, Math.floor(n / size));
  if (k <= 0) return { starts: [] };
  // best[i][j]: smallest total spread using the first i values with j blocks; Infinity when impossible.
  const best: Float64Array[] = [];
  const took: Uint8Array[] = [];
  for (let i = 0; i <= n; i++) {
    best.push(new Float64Array(k + 1).fill(Infinity));
    took.push(new Uint8Array(k + 1));
  }
  best[0][0] = 0;
  for (let i = 1; i <= n; i++) {
    best[i][0] = 0;
    const spread = i >= size ? sorted[i - 1] - sorted[i - size] : Infinity;
    const allowed = i >= size && spread <= cap;
    for (let j = 1; j <= k; j++) {
      let v = best[i - 1][j];
      let t = 0;
      if (allowed) {
        const w = best[i - size][j - 1] + spread;
        // Strictly better only, so ties keep the earlier (lower-Vf) readings unused: deterministic.
        if (w < v) { v = w; t = 1; }
      }
      best[i][j] = v;
      took[i][j] = t;
    }
  }
  let j = k;
  while (j > 0 && best[n][j] === Infinity) j--;
  const starts: number[] = [];
  for (let i = n; i > 0 && j > 0;) {
    if (took[i][j]) { starts.push(i - size); i -= size; j--; } else i--;
  }
  return { starts: starts.reverse() };
}

/**
 * The exact best `count` blocks under an objective and an optional cap: for "max", the smallest
 * threshold (one of the block spreads, by the exchange argument above) that still allows as many
 * blocks as the cap alone does, then the smallest total under it.
 */
export function chooseBlocks(sorted: readonly number[], size: number, count: number, objective: MatchObjective, cap = Infinity): GroupChoice {
  const most = consecutiveBlocks(sorted, size, count, cap);
  if (objective === 'sum' || most.starts.length === 0) return most;
  const want = most.starts.length;
  const spreads = [...new Set(sorted.slice(size - 1).map((v, i) => v - sorted[i]).filter((s) => s <= cap))].sort((a, b) => a - b);
  // The count reachable grows with the threshold: binary search the smallest one that reaches `want`.
  let lo = 0;
  let hi = spreads.length - 1;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (consecutiveBlocks(sorted, size, want, spreads[mid]).starts.length >= want) hi = mid;
    else lo = mid + 1;
  }
  return consecutiveBlocks(sorted, size, want, spreads[lo]);
}
