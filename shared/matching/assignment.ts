// Minimum-cost assignment on a bipartite graph: the Hungarian method (Kuhn 1955, Munkres 1957) with
// potentials and shortest augmenting paths, O(n² m) for n rows ≤ m columns. Exact: the potentials
// are a feasible dual solution with every chosen edge tight, so the assignment is optimal (LP duality).
// Used for cross pairing of asymmetric options, where the two sides come from different trays.

/**
 * Assigns every row to a distinct column (rows ≤ columns) at the least total cost; returns the
 * column of each row. e.g. minCostAssignment([[4, 1], [2, 3]]) → [1, 0] (cost 3).
 */
export function minCostAssignment(cost: readonly (readonly number[])[]): number[] {
  const n = cost.length;
  if (n === 0) return [];
  const m = cost[0].length;
  if (m < n) throw new Error(`minCostAssignment needs rows ≤ columns, got ${n} × ${m}`);
  // 1-based arrays as in the textbook formulation; column 0 is the virtual start.
  const u = new Float64Array(n + 1);
  const v = new Float64Array(m + 1);
  const rowOf = new Int32Array(m + 1); // rowOf[j]: row assigned to column j (0 = none)
  const way = new Int32Array(m + 1);
  const minv = new Float64Array(m + 1);
  const used = new Uint8Array(m + 1);
  for (let i = 1; i <= n; i++) {
    rowOf[0] = i;
    let j0 = 0;
    minv.fill(Infinity);
    used.fill(0);
    do {
      used[j0] = 1;
      const i0 = rowOf[j0];
      let delta = Infinity;
      let j1 = 0;
      const row = cost[i0 - 1];
      for (let j = 1; j <= m; j++) {
        if (used[j]) continue;
        const cur = row[j - 1] - u[i0] - v[j];
        if (cur < minv[j]) { minv[j] = cur; way[j] = j0; }
        if (minv[j] < delta) { delta = minv[j]; j1 = j; }
      }
      for (let j = 0; j <= m; j++) {
        if (used[j]) { u[rowOf[j]] += delta; v[j] -= delta; } else minv[j] -= delta;
      }
      j0 = j1;
    } while (rowOf[j0] !== 0);
    do {
      const j1 = way[j0];
      rowOf[j0] = rowOf[j1];
      j0 = j1;
    } while (j0 !== 0);
  }
  const result = new Array<number>(n).fill(-1);
  for (let j = 1; j <= m; j++) if (rowOf[j] !== 0) result[rowOf[j] - 1] = j - 1;
  return result;
}
