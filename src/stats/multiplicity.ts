/**
 * Adjusting a family of p-values for multiplicity: Bonferroni, Holm's (1979) step-down, and the Benjamini–Hochberg
 * (1995) step-up false discovery rate. Adjusted p-values in the input order, capped at 1, as R's p.adjust.
 */
export type MultiplicityMethod = 'bonferroni' | 'holm' | 'bh';
/** Accepted spellings: "bh" and "benjamini-hochberg" are the same method. */
export type AdjustmentMethod = MultiplicityMethod | 'benjamini-hochberg';

export const MULTIPLICITY_METHODS: readonly MultiplicityMethod[] = ['holm', 'bh', 'bonferroni'];

export function adjustPValues(p: readonly number[], method: AdjustmentMethod): number[] {
  const m = p.length;
  if (method === 'bonferroni') return p.map((x) => Math.min(1, x * m));
  const order = p.map((_, i) => i).sort((a, b) => p[a] - p[b]);
  const adjusted = new Array<number>(m);
  if (method === 'holm') {
    let running = 0;
    order.forEach((idx, rank) => {
      running = Math.max(running, Math.min(1, (m - rank) * p[idx]));
      adjusted[idx] = running;
    });
    return adjusted;
  }
  let running = 1;
  for (let rank = m - 1; rank >= 0; rank--) {
    const idx = order[rank];
    running = Math.min(running, (m / (rank + 1)) * p[idx]);
    adjusted[idx] = Math.min(1, running);
  }
  return adjusted;
}
