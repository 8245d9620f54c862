// Exact and Monte Carlo p-values for r×c tables: Fisher's exact test (network algorithm, without a work limit) on the
// issue's table sizes, the hard 5×5 among them, and 1e5 Monte Carlo resamples on a 5×5 table with N = 1000, with R's fisher.test and
// chisq.test(simulate.p.value = TRUE) timed in the same run when /usr/bin/Rscript is present.
import { spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { fisherExactRxC, type FisherExactOutcome } from '../src/stats/procedures/exact';
import { monteCarloTable } from '../src/stats/procedures/montecarlo';

const EXACT_TABLES: Record<string, number[][]> = {
  '2×6 N=500': [[40, 45, 38, 50, 42, 35], [42, 40, 45, 38, 44, 41]],
  '3×4 N=200': [[10, 20, 15, 25], [12, 18, 22, 8], [20, 15, 10, 25]],
  '5×5 N=100 (no association)': [[4, 5, 3, 4, 4], [3, 4, 5, 4, 4], [5, 3, 4, 4, 4], [4, 4, 4, 5, 3], [4, 4, 4, 3, 5]],
  '5×5 N=100 (mild association)': [[6, 5, 4, 3, 2], [5, 5, 4, 3, 3], [4, 4, 5, 4, 3], [3, 4, 4, 5, 4], [2, 3, 4, 5, 6]],
  // The hard one: p ≈ 2e-5, 1.4e8 steps, far beyond the default work limit (timed here without a limit).
  '5×5 N=80 (strong association)': [[8, 3, 2, 1, 0], [2, 7, 3, 1, 1], [1, 2, 6, 3, 2], [0, 2, 3, 7, 3], [1, 0, 2, 4, 9]],
};
const EXACT_RUNS = 3;
const MC_TABLE = [[45, 38, 42, 36, 39], [40, 44, 37, 41, 38], [38, 41, 46, 35, 40], [42, 36, 39, 44, 39], [35, 41, 36, 44, 44]];

function ms(start: bigint): number {
  return Number(process.hrtime.bigint() - start) / 1e6;
}

function rMatrix(t: number[][]): string {
  return `matrix(c(${t.flat().join(',')}), ${t.length}, byrow = TRUE)`;
}

/**
 * Elapsed and CPU (user + system) milliseconds of each R expression, timed by R's system.time in one Rscript process.
 * Both are printed: on a loaded machine the elapsed times of both sides grow with the load, the CPU times much less.
 */
function timeInR(expressions: string[], repeats: readonly number[] = []): { elapsed: number; cpu: number }[] | null {
  if (!existsSync('/usr/bin/Rscript')) return null;
  const code = expressions
    .map((e, i) => {
      const runs = repeats[i] ?? 1;
      return `tryCatch({ t <- sapply(1:${runs}, function(k) system.time(invisible(${e}))); cat(min(t["elapsed", ]), min(t["user.self", ] + t["sys.self", ]), "\\n") }, error = function(err) cat("NaN NaN\\n"))`;
    })
    .join('; ');
  const out = spawnSync('/usr/bin/Rscript', ['-e', code], { encoding: 'utf8', timeout: 600_000 });
  if (out.status !== 0) return null;
  return out.stdout.trim().split('\n').map((line) => {
    const [elapsed, cpu] = line.trim().split(/\s+/).map((x) => Number(x) * 1000);
    return { elapsed, cpu };
  });
}

export async function run(): Promise<void> {
  // Warm-up so that the figures are steady-state JIT-compiled code (R's are compiled C): a 4×4 table (not one of
  // those timed) runs every path of the network; a 3×3 one alone left the first 5×5 three times slower (74 vs 23 ms CPU).
  fisherExactRxC([[3, 1, 4], [0, 5, 2], [2, 2, 1]]);
  fisherExactRxC([[1, 2, 1, 0], [3, 3, 6, 1], [10, 10, 14, 9], [6, 7, 12, 11]]);
  monteCarloTable(MC_TABLE, { statistic: 'pearson', resamples: 10_000, seed: 9 });
  monteCarloTable(MC_TABLE, { statistic: 'probability', resamples: 10_000, seed: 9 });
  const names = Object.keys(EXACT_TABLES);
  // The best of EXACT_RUNS runs on each side (one for the hard 5×5, which takes seconds), so that a busy machine
  // disturbs the comparison less.
  const runsOf = (name: string): number => (name.includes('strong') ? 1 : EXACT_RUNS);
  const ours = names.map((name) => {
    let best = { ms: Infinity, cpu: Infinity };
    let result: FisherExactOutcome | undefined;
    for (let k = 0; k < runsOf(name); k++) {
      const cpu = process.cpuUsage();
      const start = process.hrtime.bigint();
      result = fisherExactRxC(EXACT_TABLES[name], { workLimit: Infinity });
      const used = process.cpuUsage(cpu);
      best = { ms: Math.min(best.ms, ms(start)), cpu: Math.min(best.cpu, (used.user + used.system) / 1000) };
    }
    return { name, ...best, p: result?.pValue?.value, work: result?.work };
  });
  const mcStarts: { statistic: 'pearson' | 'probability'; ms: number; p: number }[] = [];
  for (const statistic of ['pearson', 'probability'] as const) {
    const start = process.hrtime.bigint();
    const r = monteCarloTable(MC_TABLE, { statistic, resamples: 100_000, seed: 1 });
    mcStarts.push({ statistic, ms: ms(start), p: r.pValue });
  }
  const r = timeInR([
    ...names.map((n) => `fisher.test(${rMatrix(EXACT_TABLES[n])}, workspace = 2e8)`),
    `fisher.test(${rMatrix(EXACT_TABLES['3×4 N=200'])})`,
    `chisq.test(${rMatrix(MC_TABLE)}, simulate.p.value = TRUE, B = 1e5)`,
    `fisher.test(${rMatrix(MC_TABLE)}, simulate.p.value = TRUE, B = 1e5)`,
  ], names.map(runsOf));
  for (let i = 0; i < ours.length; i++) {
    const o = ours[i];
    const rText = r ? `R fisher.test (workspace 2e8) ${r[i].elapsed.toFixed(0)} ms (CPU ${r[i].cpu.toFixed(0)} ms)` : 'R not installed';
    console.log(`Fisher exact ${o.name.padEnd(30)} ${o.ms.toFixed(0).padStart(6)} ms (CPU ${o.cpu.toFixed(0)} ms)  p = ${o.p?.toPrecision(6)}  steps ${o.work}   ${rText}`);
  }
  if (r) console.log(`R fisher.test on 3×4 N=200 with its default workspace: ${Number.isNaN(r[names.length].elapsed) ? 'failed' : `${r[names.length].elapsed.toFixed(0)} ms`}`);
  const rChisq = r ? r[names.length + 1].elapsed : NaN;
  const rFisher = r ? r[names.length + 2].elapsed : NaN;
  for (const m of mcStarts) {
    const rMs = m.statistic === 'pearson' ? rChisq : rFisher;
    const rName = m.statistic === 'pearson' ? 'chisq.test' : 'fisher.test';
    const ratio = Number.isFinite(rMs) ? `  ${(m.ms / rMs).toFixed(2)}× R ${rName} (${rMs.toFixed(0)} ms)` : '';
    console.log(`Monte Carlo 1e5 resamples, 5×5 N=1000, ${m.statistic.padEnd(11)} ${m.ms.toFixed(0).padStart(6)} ms  p = ${m.p.toFixed(4)}${ratio}`);
  }
}

export const exactBench = { name: 'exact', run };
