// Time for the everyday count procedures on sizes people meet: a 50×50 independence test (the figure),
// a 2×2 with Fisher's exact test at counts near 1e9, and a 100-category goodness of fit.
import { goodnessOfFit } from '../src/stats/procedures/fit';
import { independenceTest } from '../src/stats/procedures/table';

function timeMs(run: () => unknown, repeats: number): { median: number; best: number } {
  const times: number[] = [];
  for (let i = 0; i < repeats; i++) {
    const start = process.hrtime.bigint();
    run();
    times.push(Number(process.hrtime.bigint() - start) / 1e6);
  }
  times.sort((a, b) => a - b);
  return { median: times[Math.floor(times.length / 2)], best: times[0] };
}

function report(label: string, run: () => unknown, repeats: number): void {
  run(); // warm-up: compile the paths once
  const { median, best } = timeMs(run, repeats);
  console.log(`${label.padEnd(52)} median ${median.toFixed(3)} ms   best ${best.toFixed(3)} ms   (${repeats} runs)`);
}

export const tablesBench = {
  name: 'tables',
  async run(): Promise<void> {
    // Counts from a fixed pattern (no randomness), between 1 and 60.
    const table50 = Array.from({ length: 50 }, (_, i) => Array.from({ length: 50 }, (_, j) => ((i * 31 + j * 17 + i * j) % 60) + 1));
    report('independence test, 50×50 table (N ≈ 76,000)', () => independenceTest(table50), 50);
    const huge50 = table50.map((row) => row.map((v) => v * 1e7 + 3));
    report('independence test, 50×50 table with counts near 1e9', () => independenceTest(huge50), 20);
    const big = 1e9;
    report("2×2 with Fisher's exact test, counts near 1e9", () => independenceTest([[big, big + 40000], [big + 30000, big]]), 20);
    report("2×2 with Fisher's exact test, N = 200", () => independenceTest([[40, 60], [55, 45]]), 200);
    const observed = Array.from({ length: 100 }, (_, i) => 50 + ((i * 37) % 23));
    report('goodness of fit, 100 categories', () => goodnessOfFit(observed), 200);
  },
};
