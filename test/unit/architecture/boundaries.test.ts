// Keeps the arrows of the architecture pointing one way: the pure layers never import
// `vscode`, and the numerical core never touches Node's I/O, the clock or randomness.
import { strict as assert } from 'node:assert';
import { readdirSync, readFileSync, statSync } from 'node:fs';
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
