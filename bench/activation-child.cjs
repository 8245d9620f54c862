// Child process of bench/activation.ts: loads DIST/extension.js with a stand-in `vscode` module (each API
// namespace the host code uses is a callable, constructible proxy) and activates it, as opening a markdown file
// does; prints one JSON line with the time to load the bundle, the time in activate(), and the memory added.
// Usage: node --expose-gc bench/activation-child.cjs DIST
const Module = require('module');
const path = require('path');
const handler = {
  get(target, prop) {
    if (prop === Symbol.toPrimitive) return () => 'stub';
    if (prop === 'then') return undefined;
    if (prop === Symbol.iterator) return function* () {};
    if (prop === 'length') return 0;
    return stub;
  },
  apply() { return stub; },
  construct() { return stub; },
};
const stub = new Proxy(function () {}, handler);
const realResolve = Module._resolveFilename;
Module._resolveFilename = function (request, ...rest) { return request === 'vscode' ? 'vscode' : realResolve.call(this, request, ...rest); };
const api = {};
const fs = require('fs');
const hostFiles = (dir) => fs.readdirSync(dir, { withFileTypes: true }).flatMap((e) => (e.isDirectory() ? hostFiles(path.join(dir, e.name)) : e.name.endsWith('.ts') ? [path.join(dir, e.name)] : []));
for (const file of hostFiles(path.join(__dirname, '..', 'src', 'host'))) for (const m of fs.readFileSync(file, 'utf8').matchAll(/vscode\.([A-Za-z0-9]+)/g)) api[m[1]] = stub;
require.cache.vscode = { id: 'vscode', filename: 'vscode', loaded: true, exports: api };
const dist = process.argv[2];
global.gc?.();
const before = process.memoryUsage();
const t0 = performance.now();
const ext = require(path.resolve(dist, 'extension.js'));
const t1 = performance.now();
const context = { subscriptions: [], extensionUri: stub, globalState: stub, workspaceState: stub, secrets: stub, extensionPath: dist, asAbsolutePath: (p) => p, extension: stub, storageUri: stub, globalStorageUri: stub, logUri: stub };
let activateMs = NaN;
try { ext.activate(context); activateMs = performance.now() - t1; } catch (e) { console.error('activate threw:', e.message); }
global.gc?.();
const after = process.memoryUsage();
const loaded = Object.keys(require.cache).filter((k) => k.includes('dist'));
console.log(JSON.stringify({ requireMs: +(t1 - t0).toFixed(1), activateMs: +activateMs.toFixed(1), heapMB: +((after.heapUsed - before.heapUsed) / 1e6).toFixed(2), rssMB: +((after.rss - before.rss) / 1e6).toFixed(1), modules: loaded.map((k) => path.basename(k)) }));
