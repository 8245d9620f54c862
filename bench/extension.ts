// Extension figures: bundle sizes (target: extension under 500 KB), and the time from a spec on a
// 1,000-row file to everything the panel shows (run, text, markdown, plot geometry) — the part of
// "command to rendered panel" that does not need the editor. Activation time and the full
// command-to-panel time are printed by `npm run test:integration`, inside the real host.
import { execFileSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { aggregateFile } from '../src/data/file';
import { resultMarkdown } from '../src/report/markdown';
import { plotsFor } from '../src/report/plots';
import { resultText } from '../src/report/text';
import { runSpec } from '../src/spec/run';

const kb = (bytes: number) => `${(bytes / 1024).toFixed(1)} KB`;

async function run(): Promise<void> {
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
  const dir = join('bench', '.data');
  mkdirSync(dir, { recursive: true });
  const csv = join(dir, 'kiosk-1000.csv');
  const lines = ['kiosk,payment,wait_seconds'];
  for (let i = 0; i < 1000; i++) lines.push(`${['North', 'South', 'East', 'West'][i % 4]},${['card', 'cash', 'phone'][(i * 7) % 3]},${(40 + ((i * 37) % 23)).toFixed(1)}`);
  writeFileSync(csv, `${lines.join('\n')}\n`);
  const spec = { version: 1, test: 'independence', source: { path: 'kiosk-1000.csv', columns: ['kiosk', 'payment'] } };
  const readers = { aggregateFile: (p: string, r: never, o: never) => aggregateFile(p, r, o) };
  const times: number[] = [];
  for (let k = 0; k < 20; k++) {
    const t0 = performance.now();
    const { result } = await runSpec(spec, { readers, specPath: join(dir, 'bench.countercheck.json') });
    resultText(result);
    resultMarkdown(result);
    if (result.kind === 'test') plotsFor(result);
    times.push(performance.now() - t0);
  }
  times.sort((a, b) => a - b);
  console.log(`1,000-row file → result, text, markdown, plots: median ${times[10].toFixed(1)} ms, max ${times[19].toFixed(1)} ms over 20 runs (panel target < 300 ms including the webview)`);
}

export const extensionBench = { name: 'extension', run };
