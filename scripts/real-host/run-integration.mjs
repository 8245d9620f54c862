// Runs test/integration inside a real VS Code workbench (code-server) driven by headless Chromium.
// The extension loads straight from the working tree (extensionDevelopmentPath); the mocha suite runs
// in the real extension host (extensionTestsPath). Mocha's output is relayed to stdout so the
// "N passing" / "N failing" lines reach CI, and the process exits with the suite's code.
// A host that cannot start fails the run (exit 1) — it never skips silently.
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { format } from 'node:util';
import { buildIntegrationTests } from './build-tests.mjs';
import { HostSetupError, launchBrowser, repoRoot, sleep, startHost, testPayloadUrl } from './host.mjs';

const timeoutMs = Number(process.env.COUNTERCHECK_INTEGRATION_TIMEOUT ?? 240_000);
const verbose = process.argv.includes('--verbose');

// Lines the workbench prints on every offline run and that say nothing about our suite.
const noise = /github\.authentication|authentication provider 'github'|ENOTFOUND|marketplace|vsda|telemetry|Failed to load resource|update\.code\.visualstudio|\[Extension Host\] (?:rejected promise|ExtensionService)|AccountPolicyGate|AgentHost|connection token|Creating a socket|reconnection-grace-time|Service Worker|builtin extensions cache|Creation of workbench contribution|Extension host \(Remote\) is (?:un)?responsive|DialogService/i;

// The host forwards console calls as (format, ...values): apply printf-style substitution like Node does.
function formatArgs(args) {
  if (!Array.isArray(args)) return String(args);
  return format(...args.map((a) => (typeof a === 'string' || typeof a === 'number' ? a : JSON.stringify(a))));
}

async function main() {
  if (!existsSync(join(repoRoot, 'dist', 'extension.js'))) {
    throw new HostSetupError('dist/extension.js is missing: run `npm run build` first.');
  }
  const suite = await buildIntegrationTests();
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
    console.error(e instanceof HostSetupError ? `\nREAL HOST NOT AVAILABLE — integration tests cannot run.\n${e.message}` : e);
    // Counted by .ci/run: a missing host is a failure, not a skip.
    console.log('  0 passing\n  1 failing');
    process.exit(1);
  },
);
