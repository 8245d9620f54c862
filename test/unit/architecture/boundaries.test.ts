// Keeps the arrows of the architecture pointing one way: the pure layers never import
// `vscode`, and the numerical core never touches Node's I/O, the clock or randomness.
import { strict as assert } from 'node:assert';
import { existsSync, readdirSync, readFileSync, statSync } from 'node:fs';
import { dirname, join, relative, resolve, sep } from 'node:path';

const root = join(__dirname, '..', '..', '..', 'src');

function tsFiles(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const path = join(dir, name);
    if (statSync(path).isDirectory()) return tsFiles(path);
    return name.endsWith('.ts') ? [path] : [];
  });
}

function importsOf(file: string): string[] {
  const text = readFileSync(file, 'utf8');
  const found: string[] = [];
  for (const m of text.matchAll(/(?:import|export)[^'"]*?from\s+['"]([^'"]+)['"]|require\(\s*['"]([^'"]+)['"]\s*\)|import\(\s*['"]([^'"]+)['"]\s*\)/g)) {
    found.push(m[1] ?? m[2] ?? m[3]);
  }
  return found;
}

/**
 * The modules a file loads when it runs: relative imports and re-exports, leaving out `import type` and
 * imports whose every name is a type (erased by the compiler, so they cannot close a loop at load time).
 */
function runtimeImportsOf(file: string): string[] {
  const text = readFileSync(file, 'utf8');
  const found: string[] = [];
  for (const m of text.matchAll(/^(?:import|export)(?!\s+type\b)[^'"]*?from\s+['"](\.[^'"]+)['"]/gm)) {
    const names = /^\s*(?:import|export)\s*\{([^}]*)\}/.exec(m[0]);
    if (names && names[1].split(',').map((n) => n.trim()).filter(Boolean).every((n) => n.startsWith('type '))) continue;
    const base = resolve(dirname(file), m[1]);
    const target = [`${base}.ts`, join(base, 'index.ts')].find((c) => existsSync(c));
    if (target) found.push(target);
  }
  return found;
}

/** Groups of modules that load each other in a loop (Tarjan's strongly connected components of size > 1). */
function importLoops(files: readonly string[]): string[][] {
  const edges = new Map(files.map((f) => [f, runtimeImportsOf(f)]));
  const index = new Map<string, number>();
  const low = new Map<string, number>();
  const stack: string[] = [];
  const onStack = new Set<string>();
  const loops: string[][] = [];
  const visit = (v: string): void => {
    index.set(v, index.size);
    low.set(v, index.get(v) ?? 0);
    stack.push(v);
    onStack.add(v);
    for (const w of edges.get(v) ?? []) {
      if (!index.has(w)) {
        visit(w);
        low.set(v, Math.min(low.get(v) ?? 0, low.get(w) ?? 0));
      } else if (onStack.has(w)) low.set(v, Math.min(low.get(v) ?? 0, index.get(w) ?? 0));
    }
    if (low.get(v) !== index.get(v)) return;
    const group: string[] = [];
    for (let w = stack.pop(); w !== undefined; w = stack.pop()) {
      onStack.delete(w);
      group.push(relative(root, w));
      if (w === v) break;
    }
    if (group.length > 1) loops.push(group);
  };
  for (const f of files) if (!index.has(f)) visit(f);
  return loops;
}

/**
 * The layers and the arrows between them: data flows source → data → savedtest → stats → report → host or cli,
 * with the planner between the saved-test layer and the host. Each layer may import only the layers listed here
 * (and itself); DEVELOPERS.md shows the same table.
 */
const ALLOWED: Readonly<Record<string, readonly string[]>> = {
  errors: [],
  stats: ['errors'],
  protocol: ['stats'],
  data: ['stats', 'errors'],
  report: ['stats', 'protocol', 'errors'],
  savedtest: ['data', 'stats', 'report', 'errors'],
  planner: ['savedtest', 'data', 'errors'],
  cli: ['savedtest', 'data', 'stats', 'report', 'errors'],
  host: ['planner', 'savedtest', 'data', 'stats', 'report', 'protocol', 'errors'],
  webview: ['protocol'],
};

/** The layer a source file belongs to: its top folder under src/, or src/errors.ts, src/protocol.ts, the CLI. */
function layerOf(path: string): string {
  const parts = relative(root, path).split(sep);
  if (parts.length > 1) return parts[0];
  const name = parts[0].replace(/\.ts$/, '');
  return name;
}

const nodeIo = /^(node:)?(fs|fs\/promises|child_process|net|http|https|tls|dgram|worker_threads|readline|os)$/;

describe('architecture boundaries', () => {
  it('no file outside src/host imports vscode', () => {
    const offenders = tsFiles(root)
      .filter((f) => !f.includes(`${join('src', 'host')}`))
      .filter((f) => importsOf(f).includes('vscode'));
    assert.deepEqual(offenders, []);
  });

  it('stats, report and spec validation import no Node I/O module', () => {
    const pure = ['stats', 'report'].flatMap((d) => tsFiles(join(root, d)));
    const offenders = pure.filter((f) => importsOf(f).some((m) => nodeIo.test(m) || m === 'pg'));
    assert.deepEqual(offenders, []);
  });

  it('the planner is pure and sits between the saved-test layer and the host', () => {
    const planner = tsFiles(join(root, 'planner'));
    const io = planner.filter((f) => importsOf(f).some((m) => nodeIo.test(m) || m === 'pg'));
    assert.deepEqual(io, [], 'the planner reads nothing itself (the host hands it what a source offers)');
    const upward = planner.filter((f) => importsOf(f).some((m) => /(^|\/)(host|webview|cli)(\/|$)/.test(m)));
    assert.deepEqual(upward, [], 'the planner imports data/, savedtest/ and errors, never the host, the webview or the CLI');
    const users = tsFiles(root)
      .filter((f) => !f.includes(join('src', 'planner')) && !f.includes(join('src', 'host')))
      .filter((f) => importsOf(f).some((m) => /(^|\/)planner\//.test(m)));
    assert.deepEqual(users, [], 'only the host asks the planner');
  });

  it('every import between layers follows an allowed arrow (the table in DEVELOPERS.md)', () => {
    const offenders: string[] = [];
    for (const file of tsFiles(root)) {
      const from = layerOf(file);
      for (const m of importsOf(file)) {
        // Packages are not layers; nor is package.json, which the command line reads for its version.
        if (!m.startsWith('.') || m.endsWith('.json')) continue;
        const to = layerOf(resolve(dirname(file), m));
        if (to !== from && !ALLOWED[from]?.includes(to)) offenders.push(`${relative(root, file)} (${from}) imports ${m} (${to})`);
      }
    }
    assert.deepEqual(offenders, []);
  });

  it('no module loads itself through a loop of imports (a loop leaves names undefined when one file is loaded first)', () => {
    assert.deepEqual(importLoops(tsFiles(root)), []);
  });

  it('stats writes no JSON path: its errors name the function argument, never a place in a saved test', () => {
    const offenders = tsFiles(join(root, 'stats')).flatMap((f) =>
      readFileSync(f, 'utf8')
        .split('\n')
        .map((line, i) => ({ line, at: `${relative(root, f)}:${i + 1}` }))
        // "$.table", `$.${key}`, "$[0]": a JSON path; the word jsonPath: a location of the saved-test layer's kind.
        .filter(({ line }) => /\$(\.[A-Za-z_$]|\[)|\$\.\$\{|jsonPath/.test(line))
        .map(({ at, line }) => `${at}: ${line.trim()}`),
    );
    assert.deepEqual(offenders, []);
  });

  it("the arguments stats errors name are the functions' own parameters and options, never a saved test's field", () => {
    const offenders: string[] = [];
    const files = tsFiles(join(root, 'stats'));
    const all = files.map((f) => readFileSync(f, 'utf8')).join('\n');
    for (const file of files) {
      const text = readFileSync(file, 'utf8');
      const named = [
        ...[...text.matchAll(/\bname: '(\w+)'/g)].map((m) => m[1]),
        // Helpers whose last string argument is the argument's name (requireLevel(alpha, 'alpha'), fail('df', …)).
        ...[...text.matchAll(/(?<!function )\b(?:requireLevel|requireChoice|labelsOr|scoresOr|requireScores|requireResamplingTotal|positive)(?:<[^>]*>)?\([^;]*?'(\w+)'\)/g)].map((m) => m[1]),
        ...[...text.matchAll(/\bfail\('(\w+)'/g)].map((m) => m[1]),
      ];
      for (const name of new Set(named)) {
        // Declared in src/stats as a parameter or an option: `(table: …`, `readonly alpha?: number`.
        const declared = new RegExp(`(?<![\\w.'"])${name}\\??: `).test(all);
        // Fields that exist only in the saved-test format: where the data live, and the sections it groups.
        const specOnly = ['source', 'bayesFactor', 'equivalence', 'test', 'version', 'recorded'].includes(name);
        if (!declared || specOnly) offenders.push(`${relative(root, file)}: ${name}`);
      }
    }
    assert.deepEqual(offenders, []);
  });

  it('stats never reads the clock or an unseeded random source', () => {
    const offenders = tsFiles(join(root, 'stats')).filter((f) => /Date\.now|new Date\(|Math\.random|performance\.now/.test(readFileSync(f, 'utf8')));
    assert.deepEqual(offenders, []);
  });
});
