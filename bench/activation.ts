// Activation cost of the extension bundle as opening a markdown file pays it (`onLanguage:markdown`): the time
// to load dist/extension.js and run activate(), and the memory it adds, in fresh processes with a stand-in
// `vscode` module (bench/activation-child.cjs). COUNTERCHECK_BENCH_BEFORE=<dist folder of another build>
// measures that build alternately with this one. The real host's own figure (activate() only) is printed by
// `npm run test:integration`.
//
// Measured 2026-12-03, 2 cores shared, load average 10–11, 9 alternating runs each, production builds:
//   before (pg and everything inlined, dist/extension.js 407 KB): load 37.2 ms median (21.9 min), activate 0.4 ms,
//     heap +2.01 MB, RSS +6.6 MB
//   after (pg and htmlparser2 as chunks loaded on first use, 340 KB): load 36.4 ms median (22.2 min),
//     activate 0.4 ms, heap +1.87 MB, RSS +7.2 MB
//   The bundle is 17 % smaller (407,245 → 339,991 bytes); the load time difference is within the noise at that load (esbuild wraps each
//   library in a function that only runs when required, so V8 only pre-parses it).
//   Then the workbook and Parquet readers as chunks too (dist/xlsx.js 38,936 bytes, dist/parquet.js 68,116 bytes,
//   loaded on first use): dist/extension.js 520,750 → 453,468 bytes (−13 %), dist/cli.js 480,619 → 411,447;
//   9 alternating runs at load average 10: load 131.7 → 130.5 ms median (min 98.8 → 110.6), activate 0.4 ms
//   both, heap +2.51 → +2.26 MB, RSS +9.2 → +8.8 MB. The load time is within the noise at that load.
import { spawnSync } from 'node:child_process';
import { join } from 'node:path';

interface Sample {
  readonly requireMs: number;
  readonly activateMs: number;
  readonly heapMB: number;
  readonly rssMB: number;
}

function sample(dist: string): Sample {
  const r = spawnSync(process.execPath, ['--expose-gc', join(__dirname, '..', 'bench', 'activation-child.cjs'), dist], { encoding: 'utf8' });
  if (r.status !== 0) throw new Error(`activation child failed: ${r.stderr.slice(-400)}`);
  return JSON.parse(r.stdout.trim().split('\n').pop()!) as Sample;
}

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

export const activationBench = {
  name: 'activation',
  async run(): Promise<void> {
    const builds: [string, string][] = [['this build', join(__dirname, '..', 'dist')]];
    if (process.env.COUNTERCHECK_BENCH_BEFORE) builds.unshift(['before', process.env.COUNTERCHECK_BENCH_BEFORE]);
    const samples = new Map<string, Sample[]>(builds.map(([name]) => [name, []]));
    for (let i = 0; i < 9; i++) for (const [name, dist] of builds) samples.get(name)!.push(sample(dist));
    for (const [name, s] of samples) {
      console.log(
        `${name}: load ${median(s.map((x) => x.requireMs)).toFixed(1)} ms median (min ${Math.min(...s.map((x) => x.requireMs)).toFixed(1)}), activate ${median(s.map((x) => x.activateMs)).toFixed(1)} ms, heap +${median(s.map((x) => x.heapMB)).toFixed(2)} MB, RSS +${median(s.map((x) => x.rssMB)).toFixed(1)} MB (9 runs)`,
      );
    }
  },
};
