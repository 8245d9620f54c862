// Runs test/integration inside a real VS Code workbench (code-server) driven by headless Chromium.
// The extension loads straight from the working tree (extensionDevelopmentPath); the mocha suite runs
// in the real extension host (extensionTestsPath). Mocha's output is relayed to stdout so the
// "N passing" / "N failing" lines reach CI, and the process exits with the suite's code.
// A host that cannot start fails the run (exit 1) — it never skips silently.
import { spawnSync } from 'node:child_process';
import { existsSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { format } from 'node:util';
import { buildIntegrationTests } from './build-tests.mjs';
import { HostSetupError, isHostSetupError, launchBrowser, repoRoot, sleep, startHost, testPayloadUrl } from './host.mjs';

const timeoutMs = Number(process.env.COUNTERCHECK_INTEGRATION_TIMEOUT ?? 240_000);
const verbose = process.argv.includes('--verbose');

// Lines the workbench prints on every offline run and that say nothing about our suite.
const noise = /github\.authentication|authentication provider 'github'|ENOTFOUND|marketplace|vsda|telemetry|Failed to load resource|update\.code\.visualstudio|\[Extension Host\] (?:rejected promise|ExtensionService)|AccountPolicyGate|AgentHost|connection token|Creating a socket|reconnection-grace-time|Service Worker|builtin extensions cache|Creation of workbench contribution|Extension host \(Remote\) is (?:un)?responsive|DialogService/i;

// The host forwards console calls as (format, ...values): apply printf-style substitution like Node does.
function formatArgs(args) {
  if (!Array.isArray(args)) return String(args);
  return format(...args.map((a) => (typeof a === 'string' || typeof a === 'number' ? a : JSON.stringify(a))));
}

// The SQL tests (test/integration/sql.test.ts) need a live PostgreSQL server: the one COUNTERCHECK_PG_ENV
// names (.ci/run starts it), else a throwaway cluster started here (PostgreSQL is installed from Debian's
// packages when missing) and stopped at the end. Its PG* variables reach the extension host through
// code-server's environment. When no server can be had, COUNTERCHECK_PG_ERROR says why and the SQL tests
// fail with that message; the rest of the suite still runs.
function postgresForTests() {
  let file = process.env.COUNTERCHECK_PG_ENV;
  let stop = () => {};
  if (!file) {
    const dir = join(tmpdir(), `countercheck-integration-pg-${process.pid}`);
    stop = () => spawnSync('bash', [join(repoRoot, 'scripts', 'pg', 'stop.sh'), dir], { stdio: 'ignore' });
    const setup = spawnSync('bash', [join(repoRoot, 'scripts', 'pg', 'ensure-server.sh'), dir], { stdio: ['ignore', 'inherit', 'inherit'] });
    if (setup.status !== 0) {
      stop();
      return { env: { COUNTERCHECK_PG_ERROR: `scripts/pg/ensure-server.sh could not start a PostgreSQL server (exit ${setup.status ?? setup.signal}); see its output above` }, stop: () => {} };
    }
    file = join(dir, 'env');
  }
  if (!existsSync(file)) return { env: { COUNTERCHECK_PG_ERROR: `COUNTERCHECK_PG_ENV=${file}, but the file does not exist: was the server started?` }, stop };
  const env = {};
  for (const line of readFileSync(file, 'utf8').split('\n')) {
    const m = /^(PG[A-Z]+)=(.*)$/.exec(line.trim());
    if (m) env[m[1]] = m[2];
  }
  const missing = ['PGHOST', 'PGPORT', 'PGDATABASE', 'PGUSER', 'PGPASSWORD'].filter((k) => !env[k]);
  if (missing.length) return { env: { COUNTERCHECK_PG_ERROR: `${file} has no ${missing.join(', ')}` }, stop };
  return { env, stop };
}

async function main() {
  if (!existsSync(join(repoRoot, 'dist', 'extension.js'))) {
    throw new HostSetupError('dist/extension.js is missing: run `npm run build` first.');
  }
  const suite = await buildIntegrationTests();
  const postgres = postgresForTests();
  process.on('exit', postgres.stop);
  for (const signal of ['SIGINT', 'SIGTERM']) process.once(signal, () => process.exit(signal === 'SIGINT' ? 130 : 143));
  Object.assign(process.env, postgres.env);
  const host = await startHost({
    copyWorkspaceFrom: join(repoRoot, 'demo'),
    // Small inputs with known answers, beside the demo files, so command tests do not depend on demo data changing.
    extraCopies: [[join(repoRoot, 'test', 'integration', 'data'), 'integration-data']],
    settings: { 'workbench.colorTheme': 'Default Light Modern' } });
  let context;
  let exitCode = 1;
  try {
    context = await launchBrowser(host);
    const page = context.pages()[0] ?? (await context.newPage());
    let resolveExit;
    const exited = new Promise((r) => { resolveExit = r; });
    await page.exposeFunction('codeAutomationExit', (code) => { resolveExit(Number(code)); });
    await page.exposeFunction('codeAutomationLog', (type, args) => {
      let line = formatArgs(args);
      if (!verbose && noise.test(line)) return;
      // Workbench errors come with long minified stacks; their first lines are enough unless --verbose.
      if (!verbose && type === 'error') line = line.split('\n').slice(0, 3).join('\n');
      process.stdout.write(`${verbose ? `[${type}] ` : ''}${line}\n`);
    });
    if (verbose) page.on('console', (m) => process.stderr.write(`[browser ${m.type()}] ${m.text()}\n`));
    await page.goto(testPayloadUrl(host, { extensionTestsPath: suite }));
    const timer = sleep(timeoutMs).then(() => 'timeout');
    const outcome = await Promise.race([exited, timer]);
    if (outcome === 'timeout') {
      console.error(`integration suite did not finish within ${timeoutMs / 1000} s`);
      console.error(host.log().split('\n').slice(-40).join('\n'));
      console.log('  0 passing\n  1 failing');
      exitCode = 1;
    } else {
      exitCode = outcome;
    }
  } finally {
    await context?.close().catch(() => {});
    await host.stop();
    host.cleanup();
  }
  return exitCode;
}

main().then(
  (code) => process.exit(code),
  (e) => {
    console.error(isHostSetupError(e) ? `\nREAL HOST NOT AVAILABLE — integration tests cannot run.\n${e.message}` : e);
    // Counted by .ci/run: a missing host is a failure, not a skip.
    console.log('  0 passing\n  1 failing');
    process.exit(1);
  },
);
