// Bundles the extension host code, the webview script, the command line and the benchmarks with esbuild.
// Every library is inlined, so the published package and the .vsix need no node_modules. The PostgreSQL
// client is its own chunk (dist/pg.js), loaded by src/data/sql/client.ts only when a SQL source is used:
// opening a markdown file activates the extension without parsing the database client.
import { build } from 'esbuild';
import { existsSync, mkdirSync, copyFileSync } from 'node:fs';
import { alias } from './bundle-options.mjs';

const production = process.argv.includes('--production');
const common = { alias, bundle: true, sourcemap: !production, minify: production, logLevel: 'warning', target: 'node20' };

/** Resolves `require('pg')` to the separate chunk beside the bundle instead of inlining it. */
const pgChunk = {
  name: 'pg-chunk',
  setup(b) {
    b.onResolve({ filter: /^pg$/ }, () => ({ path: './pg.js', external: true }));
  },
};

const entries = [
  { entryPoints: ['src/host/extension.ts'], outfile: 'dist/extension.js', platform: 'node', format: 'cjs', external: ['vscode'], plugins: [pgChunk] },
  { entryPoints: ['src/cli.ts'], outfile: 'dist/cli.js', platform: 'node', format: 'cjs', plugins: [pgChunk] },
  // pg's optional native binding is never used (pure JavaScript protocol).
  { entryPoints: ['scripts/pg-chunk.cjs'], outfile: 'dist/pg.js', platform: 'node', format: 'cjs', external: ['pg-native'] },
  // The byte scanner's thread for big files (src/data/parallel.ts finds it beside the bundle that starts it).
  { entryPoints: ['src/data/scanWorker.ts'], outfile: 'dist/scanWorker.js', platform: 'node', format: 'cjs' },
  { entryPoints: ['src/webview/main.ts'], outfile: 'dist/webview.js', platform: 'browser', format: 'iife', target: 'es2022' },
  { entryPoints: ['bench/index.ts'], outfile: 'dist/bench.js', platform: 'node', format: 'cjs', external: ['jstat', 'csv-parse', 'pg'] },
];

mkdirSync('dist', { recursive: true });
await Promise.all(entries.filter((e) => existsSync(e.entryPoints[0])).map((e) => build({ ...common, ...e })));
for (const [from, to] of [['node_modules/@vscode/codicons/dist/codicon.css', 'dist/codicon.css'], ['node_modules/@vscode/codicons/dist/codicon.ttf', 'dist/codicon.ttf']]) {
  if (existsSync(from)) copyFileSync(from, to);
}
