// Nanoseconds per call of the chi-square lower tail, upper tail and quantile at df = 5 and df = 1000,
// ours beside jstat in the same run (jstat's upper tail is 1 − cdf; it has no other).
import {
  chiSquareLowerTail,
  chiSquareQuantile,
  chiSquareUpperQuantile,
  chiSquareUpperTail,
} from '../src/stats/distributions/chisquare';

interface JStatChiSquare {
  chisquare: { cdf(x: number, dof: number): number; inv(p: number, dof: number): number };
}
// eslint-disable-next-line @typescript-eslint/no-require-imports
const jStat = (require('jstat') as { jStat: JStatChiSquare }).jStat;

/** Inputs spread over the bulk of χ²(df): x at probabilities 0.01 … 0.99, and those probabilities. */
function inputs(df: number): { xs: number[]; ps: number[] } {
  const ps = Array.from({ length: 99 }, (_, i) => (i + 1) / 100);
  return { xs: ps.map((p) => chiSquareQuantile(p, df)), ps };
}

let sink = 0;

type Fn = (v: number, df: number) => number;

function timeRound(values: readonly number[], df: number, fn: Fn, reps: number): number {
  const t0 = process.hrtime.bigint();
  for (let r = 0; r < reps; r++) for (const v of values) sink += fn(v, df);
  return Number(process.hrtime.bigint() - t0) / (reps * values.length);
}

/**
 * ns per call of two functions, measured in alternating rounds of ≥ 30 ms (so that a busy machine
 * slows both alike); the fastest of 9 rounds each is reported, the least disturbed by other processes.
 */
function nsPerCallPair(values: readonly number[], df: number, ours: Fn, theirs: Fn): [number, number] {
  let reps = 1;
  while (timeRound(values, df, ours, reps) * reps * values.length < 30e6) reps *= 2;
  timeRound(values, df, theirs, reps);
  let a = Infinity;
  let b = Infinity;
  for (let round = 0; round < 9; round++) {
    a = Math.min(a, timeRound(values, df, ours, reps));
    b = Math.min(b, timeRound(values, df, theirs, reps));
  }
  return [a, b];
}

export const distributionBench = {
  name: 'distribution',
  async run(): Promise<void> {
    console.log('ns per call (fastest of 9 alternating rounds), x or p spread over the 1%–99% range of χ²(df)');
    console.log(`${'function'.padEnd(30)}${'df'.padStart(6)}${'ours'.padStart(10)}${'jstat'.padStart(10)}`);
    for (const df of [5, 1000]) {
      const { xs, ps } = inputs(df);
      const rows: [string, readonly number[], (v: number, d: number) => number, (v: number, d: number) => number][] = [
        ['lower tail', xs, chiSquareLowerTail, (x, d) => jStat.chisquare.cdf(x, d)],
        ['upper tail (jstat: 1 − cdf)', xs, chiSquareUpperTail, (x, d) => 1 - jStat.chisquare.cdf(x, d)],
        ['quantile (lower p)', ps, chiSquareQuantile, (p, d) => jStat.chisquare.inv(p, d)],
        ['upper quantile (jstat: inv(1−q))', ps, chiSquareUpperQuantile, (q, d) => jStat.chisquare.inv(1 - q, d)],
      ];
      for (const [label, values, ourFn, theirFn] of rows) {
        const [a, b] = nsPerCallPair(values, df, ourFn, theirFn);
        console.log(`${label.padEnd(30)}${String(df).padStart(6)}${a.toFixed(0).padStart(10)}${b.toFixed(0).padStart(10)}`);
      }
    }
    if (sink === 42) console.log('');
  },
};
