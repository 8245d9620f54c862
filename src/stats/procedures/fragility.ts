/**
 * Fragility of a conclusion drawn from counts.
 *
 * - 2×2 tables: the fragility index of Walsh et al. (2014, J Clin Epidemiol 67:622). Rows are the groups, column 1
 *   the events. For a significant result, patients of the group with fewer events have their outcome changed from
 *   non-event to event, one at a time, until p ≥ α; the index is the number of changes. For a non-significant
 *   result the reverse index counts the changes, one at a time, in one group and one direction, until p < α; it is
 *   the smallest such count over the two groups and the two directions. The quotient is index / N.
 * - Any table, goodness of fit, paired and stratified tables: the generalized fragility index of Baer, Gaudino,
 *   Charlson, Fremes & Wells (2021, PNAS 118:e2105254118): the smallest number of single-observation outcome
 *   changes (one observation moved from one cell to another cell of its own group) that flips the conclusion at α.
 *   Optionally only "sufficiently likely" changes are allowed: an observation of a group may take a new outcome
 *   only when that outcome's estimated probability in the group is at least q (the per-observation likelihood
 *   threshold of that paper; the estimate used, the group's observed proportions, is our reading, from memory).
 *   The search is breadth-first over distinct tables (exact: the smallest count) while the number of tables
 *   visited stays under a bound; beyond it a greedy search gives a count that is an upper bound, and the depth the
 *   breadth-first search completed gives a lower bound. The method says which.
 *
 * Numbers only: the callers word the result.
 */
import { fisherTwoSided2x2 } from './fisher2x2';
import { chiSquareUpperProbability } from '../distributions/chisquare';

export type FragilityMethod = 'exact' | 'bounded-search';

/** One cell whose count changes: its position ([row, column], or a category label) and the counts before and after. */
export interface FragilityChange {
  readonly cell: readonly [number, number] | string;
  readonly from: number;
  readonly to: number;
}

export interface Fragility {
  /** Number of single-observation changes that flip the conclusion; null when no allowed changes flip it. */
  readonly index: number | null;
  /** index / N. */
  readonly quotient: number | null;
  /** True when the result was not significant and the index counts changes that make it significant. */
  readonly reverse: boolean;
  readonly method: FragilityMethod;
  readonly changes: readonly FragilityChange[];
  /** For a bounded search: the number of changes proven not to be enough (every table that close was examined). */
  readonly lowerBound?: number;
  /** Tables examined. */
  readonly tablesExamined: number;
  /** The bounded search reached its work limit before any change flipped the conclusion (index null). */
  readonly searchStopped?: boolean;
}

export type TwoByTwoTest = 'fisher' | 'pearson' | 'yates';

export interface TwoByTwoFragilityOptions {
  readonly test?: TwoByTwoTest;
  readonly alpha?: number;
}

/** Two-sided p-value of a 2×2 table by the named test; 1 when a margin is empty (nothing can be tested). */
export function twoByTwoPValue(a: number, b: number, c: number, d: number, test: TwoByTwoTest): number {
  const n = a + b + c + d;
  const r1 = a + b;
  const r2 = c + d;
  const c1 = a + c;
  const c2 = b + d;
  if (r1 === 0 || r2 === 0 || c1 === 0 || c2 === 0) return 1;
  if (test === 'fisher') return fisherTwoSided2x2([[a, b], [c, d]]).value;
  const diff = Math.abs(a * d - b * c);
  const corrected = test === 'yates' ? Math.max(0, diff - n / 2) : diff;
  // X² = N (|ad − bc| − correction)² / (r1 r2 c1 c2), written to avoid overflow of the products.
  const x2 = (((n * corrected) / r1) * (corrected / r2)) / c1 / c2;
  return chiSquareUpperProbability(x2, 1).value;
}

/**
 * Walsh et al. (2014) fragility index of [[a, b], [c, d]] (rows: groups; columns: event, non-event), or the reverse
 * index when p ≥ α. Work: one p-value per change, at most N of them.
 */
export function fragilityIndex2x2(table: readonly (readonly number[])[], options: TwoByTwoFragilityOptions = {}): Fragility {
  const test = options.test ?? 'fisher';
  const alpha = options.alpha ?? 0.05;
  const [[a, b], [c, d]] = table;
  const n = a + b + c + d;
  let examined = 0;
  const p = (x: readonly number[]): number => {
    examined++;
    return twoByTwoPValue(x[0], x[1], x[2], x[3], test);
  };
  const start = [a, b, c, d];
  const significant = p(start) < alpha;
  // A path changes one group's outcomes in one direction: `row` 0 or 1, `step` +1 (non-event → event) or −1.
  // A walk stops once it is as long as the best one found (it could not give a smaller count).
  const walk = (row: number, step: 1 | -1, limit: number): { count: number; cells: number[] } | null => {
    const cells = start.slice();
    const ev = 2 * row;
    const non = ev + 1;
    for (let k = 1; k < limit; k++) {
      if (step === 1 ? cells[non] === 0 : cells[ev] === 0) return null;
      cells[ev] += step;
      cells[non] -= step;
      const q = p(cells);
      if (significant ? q >= alpha : q < alpha) return { count: k, cells };
    }
    return null;
  };
  let best: { count: number; cells: number[] } | null = null;
  const consider = (row: number, step: 1 | -1): void => {
    const found = walk(row, step, best === null ? Infinity : (best as { count: number }).count);
    if (found) best = found;
  };
  if (significant) {
    // The group with fewer events; on a tie, both are tried and the smaller count kept.
    if (a <= c) consider(0, 1);
    if (c <= a) consider(1, 1);
  } else {
    // The directions that widen the difference in event proportions first: they usually end soonest and bound the others.
    const up = a * (c + d) >= c * (a + b) ? 0 : 1;
    consider(up, 1);
    consider(1 - up, -1);
    consider(up, -1);
    consider(1 - up, 1);
  }
  const found = best as { count: number; cells: number[] } | null;
  const changes: FragilityChange[] = [];
  if (found) {
    found.cells.forEach((to, i) => {
      if (to !== start[i]) changes.push({ cell: [i >> 1, i & 1], from: start[i], to });
    });
  }
  return {
    index: found ? found.count : null,
    quotient: found && n > 0 ? found.count / n : null,
    reverse: !significant,
    method: 'exact',
    changes,
    tablesExamined: examined,
  };
}

/** A search problem: counts in cells, groups of cells among which one observation may move, and the test. */
export interface FragilityProblem {
  readonly cells: readonly number[];
  /** Each group lists cell indices; an observation may move from any cell of a group to another cell of the same group. */
  readonly groups: readonly (readonly number[])[];
  /** log10 of the p-value of the test actually reported, for a table of cell counts. */
  readonly log10P: (cells: readonly number[]) => number;
  readonly alpha: number;
  /** How each cell is named in the changes. */
  readonly cellName: (cell: number) => readonly [number, number] | string;
  /**
   * Sufficiently likely changes only: the smallest estimated probability (in the observation's group) that the new
   * outcome may have; 0 (the default) allows every change.
   */
  readonly minLikelihood?: number;
  /** Upper bound on distinct tables the exact search may examine before it hands over to the greedy search. */
  readonly maxTables?: number;
  /** Upper bound on the p-values the greedy search may compute; past it the search stops without an index. */
  readonly maxGreedyEvaluations?: number;
}

interface Move {
  readonly from: number;
  readonly to: number;
}

/** Baer et al. (2021) generalized fragility index (see the top of this file). */
export function generalizedFragility(problem: FragilityProblem): Fragility {
  const { cells: start, alpha } = problem;
  const n = start.reduce((s, x) => s + x, 0);
  const logAlpha = Math.log10(alpha);
  const startLogP = problem.log10P(start);
  const significant = startLogP < logAlpha;
  const flipped = (lp: number): boolean => (significant ? !(lp < logAlpha) : lp < logAlpha);
  const moves = () => allowedMoves(problem);
  // The cost of a p-value grows with the number of cells: the default limits keep about the same work for any size.
  const maxTables = problem.maxTables ?? Math.max(100, Math.min(20_000, Math.floor(5e5 / start.length)));

  // Breadth-first over distinct tables; the first table that flips is at the smallest number of changes.
  const seen = new Set<string>([key(start)]);
  let frontier: number[][] = [start.slice()];
  let examined = 1;
  let depth = 0;
  let exhausted = true;
  while (frontier.length > 0) {
    depth++;
    const next: number[][] = [];
    for (const table of frontier) {
      for (const { candidate, k } of unseenNeighbours(table, moves, seen)) {
        seen.add(k);
        examined++;
        if (flipped(problem.log10P(candidate))) {
          return result(problem, start, candidate, depth, n, !significant, 'exact', examined);
        }
        next.push(candidate);
        if (examined >= maxTables) {
          exhausted = false;
          break;
        }
      }
      if (!exhausted) break;
    }
    if (!exhausted) break;
    frontier = next;
  }
  if (exhausted) {
    // Every reachable table was examined: no allowed changes flip the conclusion.
    return { index: null, quotient: null, reverse: !significant, method: 'exact', changes: [], tablesExamined: examined };
  }
  // Greedy: each step takes the move that brings the p-value furthest toward α, never revisiting a table.
  const provenNotEnough = depth - 1;
  let table = start.slice();
  let lp = startLogP;
  const visited = new Set<string>([key(table)]);
  const budget = examined + (problem.maxGreedyEvaluations ?? Math.max(100, Math.min(200_000, Math.floor(1e6 / start.length))));
  for (let step = 1; step <= n * Math.max(1, problem.groups.length); step++) {
    let best: number[] | null = null;
    let bestLp = significant ? -Infinity : Infinity;
    let stopped = false;
    for (const { candidate } of unseenNeighbours(table, moves, visited)) {
      const clp = problem.log10P(candidate);
      examined++;
      if (significant ? clp > bestLp : clp < bestLp) {
        best = candidate;
        bestLp = clp;
      }
      // Checked per table, not per step: one step of a table with thousands of cells has millions of neighbours.
      if (examined > budget) {
        stopped = true;
        break;
      }
    }
    if (stopped) {
      return { index: null, quotient: null, reverse: !significant, method: 'bounded-search', changes: [], lowerBound: provenNotEnough + 1, tablesExamined: examined, searchStopped: true };
    }
    if (best === null) break;
    table = best;
    lp = bestLp;
    visited.add(key(table));
    if (flipped(lp)) {
      return { ...result(problem, start, table, step, n, !significant, 'bounded-search', examined), lowerBound: provenNotEnough + 1 };
    }
  }
  return { index: null, quotient: null, reverse: !significant, method: 'bounded-search', changes: [], lowerBound: provenNotEnough + 1, tablesExamined: examined };
}

const key = (c: readonly number[]): string => c.join(',');

/** Tables one allowed move away that are not in `seen` (checked as they are produced, so a caller may add to it). */
function* unseenNeighbours(table: readonly number[], moves: () => Iterable<Move>, seen: ReadonlySet<string>): Generator<{ candidate: number[]; k: string }> {
  for (const m of moves()) {
    if (table[m.from] === 0) continue;
    const candidate = table.slice();
    candidate[m.from]--;
    candidate[m.to]++;
    const k = key(candidate);
    if (!seen.has(k)) yield { candidate, k };
  }
}

/**
 * The allowed single-observation moves, produced as they are needed: a table with k categories has k(k − 1) of
 * them (4 million at k = 2,000), too many to hold in a list, and a bounded search usually stops long before the end.
 */
function* allowedMoves(problem: FragilityProblem): Generator<Move> {
  const q = problem.minLikelihood ?? 0;
  for (const group of problem.groups) {
    const total = group.reduce((s, i) => s + problem.cells[i], 0);
    for (const from of group) {
      for (const to of group) {
        if (from === to) continue;
        if (q > 0 && !(total > 0 && problem.cells[to] / total >= q)) continue;
        yield { from, to };
      }
    }
  }
}

function result(problem: FragilityProblem, start: readonly number[], end: readonly number[], index: number, n: number, reverse: boolean, method: FragilityMethod, examined: number): Fragility {
  const changes: FragilityChange[] = [];
  end.forEach((to, i) => {
    if (to !== start[i]) changes.push({ cell: problem.cellName(i), from: start[i], to });
  });
  return { index, quotient: n > 0 ? index / n : null, reverse, method, changes, tablesExamined: examined };
}

/** The optional settings of a search problem. */
export type SearchLimits = Pick<FragilityProblem, 'minLikelihood' | 'maxTables' | 'maxGreedyEvaluations'>;

/** Rows of an r×c table as groups: an observation keeps its row and may change its column. */
export function tableProblem(
  table: readonly (readonly number[])[],
  log10P: (table: number[][]) => number,
  alpha: number,
  options: SearchLimits = {},
): FragilityProblem {
  const r = table.length;
  const c = table[0].length;
  const cells = table.flat();
  const groups = Array.from({ length: r }, (_, i) => Array.from({ length: c }, (_, j) => i * c + j));
  const unflatten = (x: readonly number[]): number[][] => Array.from({ length: r }, (_, i) => x.slice(i * c, i * c + c));
  return { cells, groups, log10P: (x) => log10P(unflatten(x)), alpha, cellName: (i) => [Math.floor(i / c), i % c] as const, ...options };
}

/** Goodness of fit: one group, the categories; an observation may change category. */
export function categoryProblem(
  observed: readonly number[],
  labels: readonly string[],
  log10P: (observed: number[]) => number,
  alpha: number,
  options: SearchLimits = {},
): FragilityProblem {
  return { cells: observed.slice(), groups: [observed.map((_, i) => i)], log10P: (x) => log10P(x.slice()), alpha, cellName: (i) => labels[i], ...options };
}

/** Stratified tables: rows within each stratum are the groups; a cell is named [row, column] of its stratum (strata stacked by rows). */
export function strataProblem(
  strata: readonly (readonly (readonly number[])[])[],
  log10P: (strata: number[][][]) => number,
  alpha: number,
  options: SearchLimits = {},
): FragilityProblem {
  const r = strata[0].length;
  const c = strata[0][0].length;
  const size = r * c;
  const cells = strata.flatMap((t) => t.flat());
  const groups: number[][] = [];
  strata.forEach((_, s) => {
    for (let i = 0; i < r; i++) groups.push(Array.from({ length: c }, (_, j) => s * size + i * c + j));
  });
  const unflatten = (x: readonly number[]): number[][][] =>
    strata.map((_, s) => Array.from({ length: r }, (_, i) => x.slice(s * size + i * c, s * size + i * c + c)));
  return { cells, groups, log10P: (x) => log10P(unflatten(x)), alpha, cellName: (i) => [Math.floor(i / c), i % c] as const, ...options };
}
