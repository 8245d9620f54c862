// `npm run test:pack`: the command line as a pipeline gets it. Packs the package (its `prepack` builds dist/),
// checks that the tarball holds exactly the files the command line needs, installs it into a throwaway prefix
// with a fresh environment (scripts/lib/npm-install-clean.sh: none of the outer `npm run`'s npm_config_*
// variables) and runs `countercheck --version`, `run`, `check` and `report` from the installed copy on a copy
// of the demo workspace. Prints the tarball's file count and size. Exit 1 with one line per failure.
import { spawnSync } from 'node:child_process';
import { cpSync, existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const pkg = JSON.parse(readFileSync(join(root, 'package.json'), 'utf8'));
const expectedFiles = ['CHANGELOG.md', 'LICENSE', 'README.md', 'THIRD-PARTY-NOTICES.md', 'bin/countercheck.js', 'dist/cli.js', 'dist/parquet.js', 'dist/pg.js', 'dist/scanWorker.js', 'dist/xlsx.js', 'package.json'];

/** The environment of a fresh shell: no npm_* variables from an outer `npm run`. */
function cleanEnv(extraPath) {
  const env = {};
  for (const [k, v] of Object.entries(process.env)) if (!/^(npm_|NPM_|INIT_CWD$|NODE$|NODE_OPTIONS$)/.test(k)) env[k] = v;
  env.PATH = `${extraPath ? `${extraPath}:` : ''}${dirname(process.execPath)}:${env.PATH ?? ''}`;
  return env;
}

const failures = [];
const notices = spawnSync(process.execPath, [join(root, 'scripts/notices.mjs'), '--check'], { cwd: root, encoding: 'utf8' });
if (notices.status !== 0) failures.push(notices.stderr.trim());
const work = mkdtempSync(join(tmpdir(), 'countercheck-pack-'));
try {
  const pack = spawnSync('npm', ['pack', '--json', '--pack-destination', work], { cwd: root, encoding: 'utf8', env: cleanEnv() });
  if (pack.status !== 0) throw new Error(`npm pack failed: ${pack.stderr.trim().split('\n').slice(-3).join(' | ')}`);
  const [info] = JSON.parse(pack.stdout.slice(pack.stdout.indexOf('[')));
  const files = info.files.map((f) => f.path).sort();
  console.log(`npm pack: ${info.filename}, ${files.length} files, ${info.size} bytes packed, ${info.unpackedSize} bytes unpacked`);
  if (JSON.stringify(files) !== JSON.stringify([...expectedFiles].sort())) failures.push(`the tarball holds ${JSON.stringify(files)}; expected ${JSON.stringify(expectedFiles)}`);
  if (pkg.dependencies && Object.keys(pkg.dependencies).length) failures.push(`runtime dependencies ${Object.keys(pkg.dependencies).join(', ')}: the bundles inline every library, so none should be declared`);

  const prefix = join(work, 'prefix');
  const install = spawnSync('bash', [join(root, 'scripts/lib/npm-install-clean.sh'), dirname(process.execPath), prefix, join(work, info.filename)], { encoding: 'utf8', env: cleanEnv() });
  if (install.status !== 0) throw new Error(`npm install of the tarball failed: ${install.stderr.trim().split('\n').slice(-3).join(' | ')}`);
  const bin = join(prefix, 'node_modules', '.bin');
  if (!existsSync(join(bin, 'countercheck'))) throw new Error(`the installed package has no countercheck command in ${bin}`);

  const demo = join(work, 'demo');
  cpSync(join(root, 'demo'), demo, { recursive: true });
  const countercheck = (args, expectedStatus, check) => {
    const r = spawnSync('countercheck', args, { cwd: work, encoding: 'utf8', env: cleanEnv(bin) });
    const shown = `countercheck ${args.join(' ')}`;
    if (r.status !== expectedStatus) failures.push(`${shown}: exit ${r.status}, expected ${expectedStatus}; stderr: ${r.stderr.trim().split('\n').slice(0, 3).join(' | ')}`);
    else if (check && !check(r)) failures.push(`${shown}: unexpected output: ${r.stdout.slice(0, 300)}`);
    else console.log(`ok  ${shown}`);
  };
  countercheck(['--version'], 0, (r) => r.stdout === `${pkg.version}\n`);
  // Bakery flavour mix: 188/97/131/34 against 40:25:25:10 — X² = 8.22, p = .042 (the demo's recorded result).
  countercheck(['run', 'demo/bakery-flavour-mix.countercheck.json'], 0, (r) => /χ²\(3, N = 450\) = 8\.22, p = \.042/.test(r.stdout));
  countercheck(['run', '--json', 'demo/bakery-oven-defects.countercheck.json'], 0, (r) => JSON.parse(r.stdout).test === 'independence');
  countercheck(['check', '--junit', 'junit.xml', 'demo'], 0, (r) => /reproduced/.test(r.stdout) && !/cannot run|differs|changed/.test(r.stdout) && /<testsuites name="countercheck check" tests="\d+" failures="0" errors="0"/.test(readFileSync(join(work, 'junit.xml'), 'utf8')));
  countercheck(['report', '--check', 'demo/report.md'], 0, (r) => /block 1: unchanged/.test(r.stdout));
  countercheck(['report', 'demo/report.md'], 0, () => readFileSync(join(demo, 'report.md'), 'utf8') === readFileSync(join(root, 'demo/report.md'), 'utf8'));
} catch (e) {
  failures.push(e.message);
} finally {
  rmSync(work, { recursive: true, force: true });
}
if (failures.length) {
  for (const f of failures) console.error(`pack check: ${f}`);
  process.exit(1);
}
console.log('pack check: the packed command line installs and runs');
