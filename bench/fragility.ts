// Fragility, Bayes factors and equivalence: the issue's speed targets (2×2 with N = 10,000 under 50 ms; 5×5 with
// N = 1,000 under 2 s), timed as the median of several runs after a warm-up.
import { pearsonTable } from '../src/stats/procedures/advanced-common';
import { contingencyBayesFactor } from '../src/stats/procedures/bayes-factor';
import { chiSquareUpperProbability } from '../src/stats/distributions/chisquare';
import { fragilityIndex2x2, generalizedFragility, tableProblem, type Fragility } from '../src/stats/procedures/fragility';

function median(xs: number[]): number {
  const s = xs.slice().sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

function timed<T>(f: () => T, runs: number): { ms: number; value: T } {
  let value = f();
  const times: number[] = [];
  for (let i = 0; i < runs; i++) {
    const start = process.hrtime.bigint();
    value = f();
    times.push(Number(process.hrtime.bigint() - start) / 1e6);
  }
  return { ms: median(times), value };
}

function pearsonLog10P(t: number[][]): number {
  const { statistic, df } = pearsonTable(t);
  return df > 0 ? chiSquareUpperProbability(statistic, df).log10 : 0;
}

function describe(f: Fragility): string {
  return `index ${f.index} (${f.method}${f.lowerBound !== undefined ? `, at least ${f.lowerBound}` : ''}, ${f.reverse ? 'reverse' : 'forward'}), ${f.tablesExamined} tables examined`;
}

export async function run(): Promise<void> {
  const twoByTwo: Record<string, number[][]> = {
    '2×2 N=10,000 significant (Fisher)': [[380, 4620], [460, 4540]],
    '2×2 N=10,000 not significant (Fisher, reverse)': [[400, 4600], [430, 4570]],
    '2×2 N=10,000 very significant (Fisher)': [[250, 4750], [520, 4480]],
  };
  for (const [name, table] of Object.entries(twoByTwo)) {
    const r = timed(() => fragilityIndex2x2(table), 5);
    console.log(`fragility ${name.padEnd(48)} ${r.ms.toFixed(1).padStart(8)} ms  ${describe(r.value)}  (target < 50 ms)`);
  }
  const fiveByFive: Record<string, number[][]> = {
    '5×5 N=1,000 significant': [[62, 38, 42, 36, 22], [40, 44, 37, 41, 38], [38, 41, 46, 35, 40], [42, 36, 39, 44, 39], [18, 41, 36, 44, 61]],
    '5×5 N=1,000 not significant': [[45, 38, 42, 36, 39], [40, 44, 37, 41, 38], [38, 41, 46, 35, 40], [42, 36, 39, 44, 39], [35, 41, 36, 44, 44]],
  };
  for (const [name, table] of Object.entries(fiveByFive)) {
    const r = timed(() => generalizedFragility(tableProblem(table, pearsonLog10P, 0.05)), 3);
    console.log(`fragility ${name.padEnd(48)} ${r.ms.toFixed(1).padStart(8)} ms  ${describe(r.value)}  (target < 2000 ms)`);
  }
  const huge = [[1_200_000, 800_000], [1_150_000, 850_000]];
  const bf = timed(() => contingencyBayesFactor(huge, 'hypergeometric'), 5);
  console.log(`Bayes factor 2×2 N=4e6 hypergeometric plan                 ${bf.ms.toFixed(1).padStart(8)} ms  log10 BF10 = ${bf.value.log10Bf10.toFixed(3)}`);
}

export const fragilityBench = { name: 'fragility', run };
