// Keeps the arrows of the architecture pointing one way: the pure layers never import
// `vscode`, and the numerical core never touches Node's I/O, the clock or randomness.
import { strict as assert } from 'node:assert';
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join } from 'node:path';

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
    assert.deepEqual(upward, [], 'the planner imports data/, spec/ and errors, never the host, the webview or the CLI');
    const users = tsFiles(root)
      .filter((f) => !f.includes(join('src', 'planner')) && !f.includes(join('src', 'host')))
      .filter((f) => importsOf(f).some((m) => /(^|\/)planner\//.test(m)));
    assert.deepEqual(users, [], 'only the host asks the planner');
  });

  it('stats never reads the clock or an unseeded random source', () => {
    const offenders = tsFiles(join(root, 'stats')).filter((f) => /Date\.now|new Date\(|Math\.random|performance\.now/.test(readFileSync(f, 'utf8')));
    assert.deepEqual(offenders, []);
  });
});
