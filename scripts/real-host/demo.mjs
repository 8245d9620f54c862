// `npm run demo`: builds the extension, installs the browser-based VS Code host if needed (cached), copies the
// demo workspace to a scratch folder (refreshed from the repository at every start, so nothing tracked changes
// while someone plays with it), starts the host on 127.0.0.1 with the extension loaded from this folder and the
// demo's README open, and prints the URL. Ctrl+C stops it (only the process group started here).
// Any failure is one line on stderr saying what failed and what to do; never a stack trace.
import { spawnSync } from 'node:child_process';
import { cpSync, existsSync, mkdirSync, rmSync, writeFileSync } from 'node:fs';
import { homedir } from 'node:os';
import { join } from 'node:path';
import { cacheDir, checkHostInstalled, isHostSetupError, repoRoot, startHost, testPayloadUrl } from './host.mjs';

/** Exits with one line: the demo's failures are things a newcomer can act on, not stack traces. */
function fail(message) {
  console.error(`\ncountercheck demo: ${message}`);
  process.exit(1);
}

function run(what, command, args, env = process.env) {
  const result = spawnSync(command, args, { stdio: 'inherit', cwd: repoRoot, env });
  if (result.error) fail(`${what} could not start (${result.error.message}).`);
  // The child already said what went wrong in its own one-line message.
  if (result.status !== 0) fail(`${what} failed (exit ${result.status ?? result.signal}); see the message above.`);
}

function ensureHost() {
  try {
    checkHostInstalled({ browser: false });
  } catch (e) {
    if (!isHostSetupError(e)) throw e;
    console.log(`Installing the browser-based VS Code into ${cacheDir} (Node 24 and code-server from the npm registry; a few minutes, once)…`);
    run('Setting up the VS Code host', 'bash', [join(repoRoot, 'scripts', 'ci', 'host.setup.sh')], { ...process.env, COUNTERCHECK_HOST_NO_BROWSER: '1' });
  }
}

/** A fresh copy of demo/ outside the clone: inserting results, refreshing the report or saving tests changes only the copy. */
function freshDemoCopy() {
  const base = process.env.COUNTERCHECK_DEMO_DIR ?? join(process.env.XDG_CACHE_HOME ?? join(homedir(), '.cache'), 'countercheck-demo');
  const workspace = join(base, 'workspace');
  rmSync(workspace, { recursive: true, force: true });
  mkdirSync(base, { recursive: true });
  cpSync(join(repoRoot, 'demo'), workspace, { recursive: true });
  return { base, workspace };
}

async function main() {
  run('Building the extension', process.execPath, [join(repoRoot, 'scripts', 'build.mjs')]);
  ensureHost();
  const { base, workspace } = freshDemoCopy();
  let host;
  try {
    host = await startHost({
      folder: workspace,
      browser: false,
      settings: {
        'workbench.colorTheme': 'Default Light Modern',
        // The demo opens on its README (what is here, what to try first), not an empty editor.
        'workbench.startupEditor': 'readme',
      },
    });
  } catch (e) {
    if (isHostSetupError(e)) fail(`the VS Code host did not start: ${e.message.split('\n')[0]} Delete ${cacheDir} and run \`npm run demo\` again.`);
    throw e;
  }
  const url = testPayloadUrl(host);
  // For a probe (CI) that checks the extension activated: the host's logs are under the user-data folder.
  writeFileSync(join(base, 'last-run.json'), JSON.stringify({ url, logs: join(host.userDataDir, 'logs'), workspace, pid: host.pid }, null, 2));
  console.log(`\nCountercheck demo is running on a copy of demo/ in ${workspace}`);
  console.log(`(refreshed from the repository at every start; your changes there are not kept).`);
  console.log(`\nOpen this URL in a browser on this machine:\n\n  ${url}\n\nPress Ctrl+C to stop.`);
  let stopping = false;
  const stop = async () => {
    if (stopping) return;
    stopping = true;
    await host.stop();
    host.cleanup();
    process.exit(0);
  };
  process.on('SIGINT', stop);
  process.on('SIGTERM', stop);
  setInterval(() => {
    if (!existsSync(host.temp)) void stop();
  }, 5000);
}

main().catch((e) => fail(String(e?.message ?? e).split('\n')[0]));
