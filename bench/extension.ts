// Extension figures: bundle sizes (target: extension under 500 KB), and the time from a spec to the
// panel's payload (the run with the host's progress reporting, then buildPanelPayload: text, markdown,
// tables, plot geometry, serialised as postMessage would) — the part of "command to rendered panel"
// that does not need the editor — for a 1,000-row file and for a ~1 GB file. Activation time and the
// full command-to-panel time are printed by `npm run test:integration`, inside the real host.
//
// The ~1 GB file is the CSV bench's parcel log at 36,000,000 rows (bench/csv.ts ensureData: generated
// once into bench/.data/, reused). COUNTERCHECK_BENCH_BIG=0 skips it; COUNTERCHECK_BENCH_BIG=<rows>
// sets another row count.
//
// Measured 2026-12-01 (2 cores, load average 4.9, warm cache): 1,000 rows → payload median 3.8 ms (max 16.4 ms
// over 20); 1,025 MB → payload 2.86 s (358 MB/s), peak RSS 93 MB, 28 progress events, 27 notification updates.
// Generating the 1 GB file took about 45 s.
import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { basename, join } from 'node:path';
import { aggregateFile } from '../src/data/file';
import { buildPanelPayload } from '../src/report/panel';
import { runSpec } from '../src/savedtest/run';
import type { SpecReaders } from '../src/savedtest/types';
import { dataPath, ensureData } from './csv';

const kb = (bytes: number) => `${(bytes / 1024).toFixed(1)} KB`;
const BIG_ROWS = 36_000_000;
const CHILD = 'COUNTERCHECK_EXTENSION_BENCH_CHILD';

/** What the host's file reader does with progress (src/host/services.ts, extensionReaders). */
const readers: SpecReaders = {
  aggregateFile: (file, request, options, control) =>
    aggregateFile(file, request, options, {
      signal: control.signal,
      onProgress: (p) => { if (p.totalBytes) control.onProgress?.(p.bytesRead / p.totalBytes); },
    }),
};

interface PanelRun {
  readonly ms: number;
  /** Progress callbacks from the reader, and the updates the notification would show (whole percents that moved). */
  readonly progressEvents: number;
  readonly notificationUpdates: number;
  /** Largest resident set seen at a progress event. */
  readonly rssAtProgressMb: number;
  readonly headline: string;
}

/** Spec → run with progress as the host reports it → the panel's payload, serialised as postMessage would. */
async function toPanel(spec: Readonly<Record<string, unknown>>, specPath: string): Promise<PanelRun> {
  let progressEvents = 0;
  let notificationUpdates = 0;
  let reported = 0;
  let rss = process.memoryUsage.rss();
  const t0 = performance.now();
  const { result } = await runSpec(spec, {
    readers,
    specPath,
    onProgress: (fraction) => {
      progressEvents++;
      rss = Math.max(rss, process.memoryUsage.rss());
      const pct = Math.floor(fraction * 100);
      if (pct > reported) {
        notificationUpdates++;
        reported = pct;
      }
    },
  });
  const payload = buildPanelPayload(result, { id: 'bench', title: 'bench', sourceDescription: specPath, decimals: 2, canSave: true, canRerun: true });
  JSON.stringify(payload);
  return { ms: performance.now() - t0, progressEvents, notificationUpdates, rssAtProgressMb: rss / 1e6, headline: payload.headline };
}

function bigRows(): number {
  const setting = process.env.COUNTERCHECK_BENCH_BIG;
  if (setting === undefined || setting === '' || setting === '1') return BIG_ROWS;
  return Math.max(0, Math.floor(Number(setting)) || 0);
}

async function bigFile(dir: string): Promise<void> {
  const rows = bigRows();
  if (rows === 0) {
    console.log(`~1 GB file → panel: skipped (COUNTERCHECK_BENCH_BIG=0; unset it to generate ${BIG_ROWS.toLocaleString('en')} rows once into ${dir}/ and measure)`);
    return;
  }
  ensureData(rows);
  if (process.env[CHILD] !== '1') {
    // Measured in a process of its own, so the peak RSS is this run's and not the bundle builds' above.
    const child = spawnSync(process.execPath, [process.argv[1], 'extension'], { env: { ...process.env, [CHILD]: '1' }, stdio: 'inherit' });
    if (child.status !== 0) console.log(`~1 GB file → panel: FAILED (exit ${child.status ?? child.signal})`);
    return;
  }
  const file = dataPath(rows);
  const mb = statSync(file).size / 1e6;
  const before = (process.resourceUsage().maxRSS * 1024) / 1e6;
  const spec = { version: 1, test: 'independence', source: { path: basename(file), columns: ['depot', 'size'] } };
  const r = await toPanel(spec, join(dir, 'bench.countercheck.json'));
  const peak = (process.resourceUsage().maxRSS * 1024) / 1e6;
  console.log(
    `${mb.toFixed(0)} MB file (${rows.toLocaleString('en')} rows, depot × size) → panel payload: ${(r.ms / 1000).toFixed(2)} s, ${(mb / (r.ms / 1000)).toFixed(0)} MB/s; ` +
      `peak RSS ${peak.toFixed(0)} MB (process of its own, ${before.toFixed(0)} MB before the run; ${r.rssAtProgressMb.toFixed(0)} MB at most at a progress event); ` +
      `${r.progressEvents} progress events, ${r.notificationUpdates} notification updates (whole percents); one run, warm cache`,
  );
  console.log(`  headline: ${r.headline}`);
}

async function run(): Promise<void> {
  const dir = join('bench', '.data');
  if (process.env[CHILD] === '1') return bigFile(dir);
  for (const [name, file] of [['extension bundle', 'dist/extension.js'], ['webview bundle', 'dist/webview.js'], ['codicons (css + font)', 'dist/codicon.css']] as const) {
    if (!existsSync(file)) { console.log(`${name}: ${file} missing (run npm run build)`); continue; }
    const size = statSync(file).size + (file.endsWith('.css') && existsSync('dist/codicon.ttf') ? statSync('dist/codicon.ttf').size : 0);
    console.log(`${name}: ${kb(size)}${file === 'dist/extension.js' ? ' (development build, unminified)' : ''}`);
  }
  // The packaged bundle is the minified one (`npm run package`): measure it without touching dist/.
  const temp = mkdtempSync(join(tmpdir(), 'countercheck-bundle-'));
  try {
    const out = join(temp, 'extension.js');
    execFileSync(join('node_modules', '.bin', 'esbuild'), ['src/host/extension.ts', '--bundle', '--minify', '--platform=node', '--format=cjs', '--target=node20', '--external:vscode', `--outfile=${out}`, '--log-level=warning']);
    console.log(`extension bundle, minified as packaged: ${kb(statSync(out).size)} (target < 500 KB)`);
  } finally {
    rmSync(temp, { recursive: true, force: true });
  }
  mkdirSync(dir, { recursive: true });
  const csv = join(dir, 'kiosk-1000.csv');
  const lines = ['kiosk,payment,wait_seconds'];
  for (let i = 0; i < 1000; i++) lines.push(`${['North', 'South', 'East', 'West'][i % 4]},${['card', 'cash', 'phone'][(i * 7) % 3]},${(40 + ((i * 37) % 23)).toFixed(1)}`);
  writeFileSync(csv, `${lines.join('\n')}\n`);
  const spec = { version: 1, test: 'independence', source: { path: 'kiosk-1000.csv', columns: ['kiosk', 'payment'] } };
  const times: number[] = [];
  for (let k = 0; k < 20; k++) times.push((await toPanel(spec, join(dir, 'bench.countercheck.json'))).ms);
  times.sort((a, b) => a - b);
  console.log(`1,000-row file → panel payload: median ${times[10].toFixed(1)} ms, max ${times[19].toFixed(1)} ms over 20 runs (panel target < 300 ms including the webview)`);
  await bigFile(dir);
}

export const extensionBench = { name: 'extension', run };
