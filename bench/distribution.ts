// Nanoseconds per call of the chi-square lower tail, upper tail and quantile at df = 5 and df = 1000,
// ours beside jstat in the same run (jstat's upper tail is 1 − cdf; it has no other).
import {
  chiSquareLowerTail,
  chiSquareQuantile,
  chiSquareUpperQuantile,
  chiSquareUpperTail,
} from '../src/stats/chisquare';

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

/** Median over 7 rounds of ns per call, each round ≥ 100 ms. */
function nsPerCall(values: readonly number[], df: number, fn: (v: number, df: number) => number): number {
  const rounds: number[] = [];
  let reps = 1;
  for (;;) {
    const t0 = process.hrtime.bigint();
    for (let r = 0; r < reps; r++) for (const v of values) sink += fn(v, df);
    const ms = Number(process.hrtime.bigint() - t0) / 1e6;
    if (ms >= 100) break;
    reps *= 2;
  }
  for (let round = 0; round < 7; round++) {
    const t0 = process.hrtime.bigint();
    for (let r = 0; r < reps; r++) for (const v of values) sink += fn(v, df);
    rounds.push(Number(process.hrtime.bigint() - t0) / (reps * values.length));
  }
  rounds.sort((a, b) => a - b);
  return rounds[3] as number;
}

export const distributionBench = {
  name: 'distribution',
  async run(): Promise<void> {
    console.log('ns per call (median of 7 rounds), x or p spread over the 1%–99% range of χ²(df)');
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
        const a = nsPerCall(values, df, ourFn);
        const b = nsPerCall(values, df, theirFn);
        console.log(`${label.padEnd(30)}${String(df).padStart(6)}${a.toFixed(0).padStart(10)}${b.toFixed(0).padStart(10)}`);
      }
    }
    if (sink === 42) console.log('');
  },
};

if (require.main === module) void distributionBench.run();
