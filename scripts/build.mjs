// Bundles the extension host code, the webview script, the command line and the benchmarks with esbuild.
// Every library is inlined, so the published package and the .vsix need no node_modules. The PostgreSQL
// client and the HTML tokenizer are chunks of their own (see lazyChunks), loaded only when used: opening a
// markdown file activates the extension without parsing either.
import { build } from 'esbuild';
import { existsSync, mkdirSync, copyFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { alias } from './bundle-options.mjs';

const production = process.argv.includes('--production');
/** `--outdir=DIR` builds elsewhere than dist/ (the chunk test builds the production bundles into a temporary folder). */
const outdir = process.argv.find((a) => a.startsWith('--outdir='))?.slice('--outdir='.length) ?? 'dist';
const common = { alias, bundle: true, sourcemap: !production, minify: production, logLevel: 'warning', target: 'node20' };

/**
 * Libraries loaded on first use, each its own bundle beside the one that requires it: `require('pg')` (a SQL
 * source) and `require('htmlparser2')` (a notebook's HTML table) resolve to dist/pg.js and dist/htmlparser2.js
 * instead of being inlined, so activation parses neither.
 */
const lazyChunks = {
  name: 'lazy-chunks',
  setup(b) {
    b.onResolve({ filter: /^(pg|htmlparser2)$/ }, (args) => (args.kind === 'require-call' ? { path: `./${args.path}.js`, external: true } : undefined));
    // The workbook and Parquet readers (our code plus hyparquet and its decompressors): src/data/readers.ts requires them.
    b.onResolve({ filter: /^\.\/(xlsx|parquet)$/ }, (args) =>
      args.kind === 'require-call' && args.importer.endsWith(join('src', 'data', 'readers.ts')) ? { path: `./${args.path.slice(2)}.js`, external: true } : undefined,
    );
  },
};

/**
 * In a reader chunk, src/errors.ts is the loading bundle's own module (scripts/chunks/shared-errors.cjs, registered by
 * src/data/lazy.ts): a second copy would be a second InputError class, which `isInstance` outside the chunk would not know.
 */
const errorsModule = resolve('src', 'errors');
const sharedErrors = {
  name: 'shared-errors',
  setup(b) {
    b.onResolve({ filter: /(^|\/)errors$/ }, (args) => (resolve(args.resolveDir, args.path) === errorsModule ? { path: resolve('scripts', 'chunks', 'shared-errors.cjs') } : undefined));
  },
};

const entries = [
  { entryPoints: ['src/host/extension.ts'], outfile: 'dist/extension.js', platform: 'node', format: 'cjs', external: ['vscode'], plugins: [lazyChunks] },
  { entryPoints: ['src/cli.ts'], outfile: 'dist/cli.js', platform: 'node', format: 'cjs', plugins: [lazyChunks] },
  // pg's optional native binding is never used (pure JavaScript protocol).
  { entryPoints: ['scripts/chunks/pg.cjs'], outfile: 'dist/pg.js', platform: 'node', format: 'cjs', external: ['pg-native'] },
  { entryPoints: ['scripts/chunks/htmlparser2.mjs'], outfile: 'dist/htmlparser2.js', platform: 'node', format: 'cjs' },
  // The byte scanner's thread for big files (src/data/parallel.ts finds it beside the bundle that starts it).
  { entryPoints: ['src/data/scanWorker.ts'], outfile: 'dist/scanWorker.js', platform: 'node', format: 'cjs' },
  // The workbook and Parquet readers, required by src/data/readers.ts when a workbook or a Parquet file is first read.
  { entryPoints: ['src/data/xlsx.ts'], outfile: 'dist/xlsx.js', platform: 'node', format: 'cjs', plugins: [sharedErrors] },
  { entryPoints: ['src/data/parquet.ts'], outfile: 'dist/parquet.js', platform: 'node', format: 'cjs', plugins: [sharedErrors] },
  { entryPoints: ['src/webview/main.ts'], outfile: 'dist/webview.js', platform: 'browser', format: 'iife', target: 'es2022' },
  { entryPoints: ['bench/index.ts'], outfile: 'dist/bench.js', platform: 'node', format: 'cjs', external: ['jstat', 'csv-parse', 'pg', '@duckdb/node-api'] },
];

mkdirSync(outdir, { recursive: true });
await Promise.all(entries.filter((e) => existsSync(e.entryPoints[0])).map((e) => build({ ...common, ...e, outfile: join(outdir, e.outfile.slice('dist/'.length)) })));
for (const name of ['codicon.css', 'codicon.ttf']) {
  const from = `node_modules/@vscode/codicons/dist/${name}`;
  if (existsSync(from)) copyFileSync(from, join(outdir, name));
}
