// Inputs that used to hang, crash or run out of memory, timed in-process (figures, not targets; the bounds they
// must meet are in the README's "Limits"). Each prints its elapsed time and the process's peak resident memory.
import { fisherExact2x2 } from '../src/stats/procedures/fisher2x2';
import { mcnemarStatistics } from '../src/stats/procedures/paired';
import { stratifiedTest } from '../src/stats/procedures/stratified';
import { distributionFitTest } from '../src/stats/procedures/distfit';
import { chiSquareUpperQuantile } from '../src/stats/distributions/chisquare';
import { runSpec } from '../src/savedtest/run';

const ones = (k: number): number[][] => Array.from({ length: k }, () => new Array<number>(k).fill(1));
const noFiles = { aggregateFile: async (): Promise<never> => { throw new Error('no file'); } };

const CASES: [string, () => unknown][] = [
  ['independence, 20×20 table of ones (exact p beside gives up)', () => runSpec({ test: 'independence', table: ones(20) }, { readers: noFiles, specPath: '/b/s.countercheck.json' })],
  ['independence, 15×15 table of ones', () => runSpec({ test: 'independence', table: ones(15) }, { readers: noFiles, specPath: '/b/s.countercheck.json' })],
  ['McNemar exact and mid-p, b = c = 1e7', () => mcnemarStatistics(1e7, 1e7)],
  ['McNemar exact and mid-p, b = c = 1e8', () => mcnemarStatistics(1e8, 1e8)],
  ['McNemar exact and mid-p, b = 1e12, c = 1e12 + 3e6', () => mcnemarStatistics(1e12, 1e12 + 3e6)],
  ['McNemar exact and mid-p, b = 1e15, c = 1e15 + 1e8', () => mcnemarStatistics(1e15, 1e15 + 1e8)],
  ['Fisher 2×2, margins of 2e12', () => fisherExact2x2([[1e12, 1e12 + 2e6], [1e12, 1e12 - 1e6]])],
  ['Fisher 2×2, margins of 2e15', () => fisherExact2x2([[1e15, 1e15 + 1e8], [1e15 - 5e7, 1e15]])],
  ['McNemar exact and mid-p at the limit, b + c = 2^53 − 1, 10σ apart', () => mcnemarStatistics(2 ** 52 - 5e8 - 1, 2 ** 52 + 5e8)],
  ['McNemar exact and mid-p, b = 1e15 − 5e9, c = 1e15 + 5e9 (ln p ≈ −25006)', () => mcnemarStatistics(1e15 - 5e9, 1e15 + 5e9)],
  ['Fisher 2×2 at the limit, total 2^53 − 1', () => fisherExact2x2([[2 ** 51 + 1e8, 2 ** 51 - 1e8], [2 ** 51 - 1e8, 2 ** 51 - 1 + 1e8]])],
  ['Fisher 2×2, margins of 1e14 and 1e15 (unbalanced)', () => fisherExact2x2([[45454555454545, 54545444545455], [454545444545455, 545454555454545]])],
  ['stratified CMH, counts of 1e9 (exact line left out)', () => stratifiedTest([[[1e9, 2e9], [3e9, 4e9]], [[1e9, 2e9], [3e9, 1e9]]])],
  ['distribution fit, binomial with 1e9 trials, 300 values', () => distributionFitTest(Array.from({ length: 300 }, (_, i) => 5e8 + ((i * 7919) % 80000) - 40000), { family: 'binomial', trials: 1e9 })],
  ['upper quantile, df = 0.001, q = 0.25', () => chiSquareUpperQuantile(0.25, 0.001)],
];

export async function run(): Promise<void> {
  for (const [name, work] of CASES) {
    const start = process.hrtime.bigint();
    let outcome = 'ok';
    try {
      await work();
    } catch (e) {
      outcome = `refused: ${(e as Error).message.slice(0, 60)}`;
    }
    const ms = Number(process.hrtime.bigint() - start) / 1e6;
    const peak = process.resourceUsage().maxRSS / 1024;
    console.log(`${name.padEnd(64)} ${ms.toFixed(0).padStart(7)} ms   peak RSS ${peak.toFixed(0)} MB   ${outcome}`);
  }
}

export const hardeningBench = { name: 'hardening', run };
