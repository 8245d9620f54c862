// Bundles the extension host code, the webview script, the command line and the benchmarks with esbuild.
import { build } from 'esbuild';
import { existsSync, mkdirSync, copyFileSync } from 'node:fs';

const production = process.argv.includes('--production');
const common = { bundle: true, sourcemap: !production, minify: production, logLevel: 'warning', target: 'node20' };

const entries = [
  { entryPoints: ['src/host/extension.ts'], outfile: 'dist/extension.js', platform: 'node', format: 'cjs', external: ['vscode'] },
  { entryPoints: ['src/cli.ts'], outfile: 'dist/cli.js', platform: 'node', format: 'cjs' },
  // The byte scanner's thread for big files (src/data/parallel.ts finds it beside the bundle that starts it).
  { entryPoints: ['src/data/scanWorker.ts'], outfile: 'dist/scanWorker.js', platform: 'node', format: 'cjs' },
  { entryPoints: ['src/webview/main.ts'], outfile: 'dist/webview.js', platform: 'browser', format: 'iife', target: 'es2022' },
  { entryPoints: ['bench/index.ts'], outfile: 'dist/bench.js', platform: 'node', format: 'cjs', external: ['jstat', 'csv-parse', 'pg', '@duckdb/node-api'] },
];

mkdirSync('dist', { recursive: true });
await Promise.all(entries.filter((e) => existsSync(e.entryPoints[0])).map((e) => build({ ...common, ...e })));
for (const [from, to] of [['node_modules/@vscode/codicons/dist/codicon.css', 'dist/codicon.css'], ['node_modules/@vscode/codicons/dist/codicon.ttf', 'dist/codicon.ttf']]) {
  if (existsSync(from)) copyFileSync(from, to);
}
