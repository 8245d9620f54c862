// Starts and stops a real VS Code workbench (code-server from the npm registry) and a headless Chromium
// that drives it. Shared by the integration run, the screenshot run and `npm run demo`.
// Everything lives in one private temp folder; only the process group started here is ever killed.
import { execFileSync, spawn } from 'node:child_process';
import { cpSync, existsSync, mkdirSync, mkdtempSync, rmSync, writeFileSync, openSync, closeSync, readFileSync, readdirSync } from 'node:fs';
import { createServer } from 'node:net';
import { homedir, tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

export const repoRoot = resolve(dirname(fileURLToPath(import.meta.url)), '..', '..');
export const cacheDir = process.env.COUNTERCHECK_HOST_CACHE ?? join(homedir(), '.cache', 'countercheck-test-host');
export const chromiumPath = process.env.COUNTERCHECK_CHROMIUM ?? '/usr/bin/chromium';

const node24 = join(cacheDir, 'node24', 'node_modules', 'node', 'bin', 'node');
const codeServerEntry = join(cacheDir, 'host', 'node_modules', 'code-server', 'out', 'node', 'entry.js');

export class HostSetupError extends Error {}

/** Whether a thrown value is a HostSetupError (or a subclass). */
export function isHostSetupError(e) {
  return HostSetupError.prototype.isPrototypeOf(e);
}

/** Throws (never skips) when the host is not installed: a missing host must fail the run loudly. */
export function checkHostInstalled({ browser = true } = {}) {
  const missing = [
    [node24, 'Node 24'],
    [codeServerEntry, 'code-server'],
    ...(browser ? [[chromiumPath, 'Chromium']] : []),
  ].filter(([path]) => !existsSync(path));
  if (missing.length > 0) {
    throw new HostSetupError(
      `The real VS Code host is not installed (missing ${missing.map(([p, what]) => `${what} at ${p}`).join(', ')}).\n` +
        `\`npm test\` and \`npm run demo\` install it (scripts/ci/host.setup.sh, cached in ${cacheDir}).`,
    );
  }
}

export function freePort() {
  return new Promise((resolvePort, reject) => {
    const server = createServer();
    server.unref();
    server.on('error', reject);
    server.listen(0, '127.0.0.1', () => {
      const { port } = server.address();
      server.close(() => resolvePort(port));
    });
  });
}

export const baseSettings = {
  'chat.disableAIFeatures': true,
  'workbench.secondarySideBar.defaultVisibility': 'hidden',
  'workbench.startupEditor': 'none',
  'workbench.tips.enabled': false,
  'workbench.enableExperiments': false,
  'git.enabled': false,
  'telemetry.telemetryLevel': 'off',
  'extensions.autoCheckUpdates': false,
  'extensions.autoUpdate': false,
  'update.mode': 'none',
  'security.workspace.trust.enabled': false,
  'window.commandCenter': false,
};

/**
 * Starts code-server in its own process group on 127.0.0.1 with private config, data and extension folders.
 * `workspace`: a folder to copy into the temp area (so tests never change the repository), or null to use `folder` as is.
 */
export async function startHost({ settings = {}, copyWorkspaceFrom = null, extraCopies = [], folder = null, log = () => {}, extensionsDir = null, browser = true } = {}) {
  checkHostInstalled({ browser });
  const temp = mkdtempSync(join(tmpdir(), 'countercheck-host-'));
  const userDataDir = join(temp, 'user-data');
  const extDir = extensionsDir ?? join(temp, 'extensions');
  const xdgConfig = join(temp, 'xdg-config');
  const xdgData = join(temp, 'xdg-data');
  for (const d of [join(userDataDir, 'User'), extDir, xdgConfig, xdgData]) mkdirSync(d, { recursive: true });
  writeFileSync(join(userDataDir, 'User', 'settings.json'), JSON.stringify({ ...baseSettings, ...settings }, null, 2));

  let workspace = folder;
  if (copyWorkspaceFrom) {
    workspace = join(temp, 'workspace');
    cpSync(copyWorkspaceFrom, workspace, { recursive: true });
    for (const [from, to] of extraCopies) cpSync(from, join(workspace, to), { recursive: true });
  }

  const port = await freePort();
  const configFile = join(temp, 'code-server.yaml');
  writeFileSync(configFile, `bind-addr: 127.0.0.1:${port}\nauth: none\ncert: false\n`);
  const logFile = join(temp, 'code-server.log');
  const out = openSync(logFile, 'a');
  const args = [
    codeServerEntry,
    '--config', configFile,
    '--bind-addr', `127.0.0.1:${port}`,
    '--auth', 'none',
    '--user-data-dir', userDataDir,
    '--extensions-dir', extDir,
    '--disable-telemetry',
    '--disable-update-check',
    '--disable-workspace-trust',
    '--disable-getting-started-override',
    '--vscode-option', 'enable-smoke-test-driver',
    '--vscode-option', 'reconnection-grace-time=20',
  ];
  if (workspace) args.push(workspace);
  const child = spawn(node24, args, {
    detached: true, // setsid: its own process group, so we can stop exactly what we started
    stdio: ['ignore', out, out],
    env: { ...process.env, XDG_CONFIG_HOME: xdgConfig, XDG_DATA_HOME: xdgData, PATH: `${dirname(node24)}:${process.env.PATH}` },
  });
  closeSync(out);
  let exited = false;
  child.on('exit', () => { exited = true; });
  const url = `http://127.0.0.1:${port}`;

  const host = {
    temp, port, url, workspace, userDataDir, logFile, pid: child.pid,
    log: () => (existsSync(logFile) ? readFileSync(logFile, 'utf8') : ''),
    async stop() {
      if (!exited) {
        try { process.kill(-child.pid, 'SIGTERM'); } catch { /* already gone */ }
        const deadline = Date.now() + 5000;
        while (!exited && Date.now() < deadline) await sleep(100);
        if (!exited) { try { process.kill(-child.pid, 'SIGKILL'); } catch { /* already gone */ } }
      }
    },
    cleanup() { rmSync(temp, { recursive: true, force: true }); },
  };

  const deadline = Date.now() + 60_000;
  for (;;) {
    if (exited) {
      const text = host.log();
      host.cleanup();
      throw new HostSetupError(`code-server exited during start-up:\n${text}`);
    }
    try {
      const res = await fetch(`${url}/healthz`);
      if (res.ok) break;
    } catch { /* not listening yet */ }
    if (Date.now() > deadline) {
      await host.stop();
      const text = host.log();
      host.cleanup();
      throw new HostSetupError(`code-server did not answer /healthz within 60 s:\n${text}`);
    }
    await sleep(200);
  }
  log(`code-server ${url} (pid ${child.pid}, temp ${temp})`);
  return host;
}

/** Installs a .vsix into a throwaway extensions folder with code-server's own installer; returns the installed folder names. */
export function installVsix(vsix) {
  checkHostInstalled();
  const temp = mkdtempSync(join(tmpdir(), 'countercheck-vsix-'));
  try {
    const env = { ...process.env, XDG_CONFIG_HOME: join(temp, 'xdg-config'), XDG_DATA_HOME: join(temp, 'xdg-data') };
    const out = execFileSync(node24, [codeServerEntry, '--user-data-dir', join(temp, 'user-data'), '--extensions-dir', join(temp, 'extensions'), '--install-extension', vsix], { env, encoding: 'utf8' });
    return { output: out, installed: readdirSync(join(temp, 'extensions')).filter((n) => !n.endsWith('.json')) };
  } finally {
    rmSync(temp, { recursive: true, force: true });
  }
}

/** Headless Chromium with a fresh profile inside the host's temp folder. */
export async function launchBrowser(host, { viewport = { width: 1400, height: 900 }, colorScheme = 'light' } = {}) {
  const { chromium } = await import('playwright-core');
  const profile = join(host.temp, 'chromium-profile');
  mkdirSync(profile, { recursive: true });
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: chromiumPath,
    headless: true,
    viewport,
    colorScheme,
    args: ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
  });
  await context.grantPermissions(['clipboard-read', 'clipboard-write'], { origin: host.url }).catch(() => {});
  return context;
}

export function testPayloadUrl(host, { extensionTestsPath = null, folder = host.workspace } = {}) {
  const remote = (p) => `vscode-remote://127.0.0.1:${host.port}${p}`;
  const payload = [['extensionDevelopmentPath', remote(repoRoot)]];
  if (extensionTestsPath) payload.push(['extensionTestsPath', remote(extensionTestsPath)]);
  return `${host.url}/?folder=${encodeURIComponent(folder)}&payload=${encodeURIComponent(JSON.stringify(payload))}`;
}

export function sleep(ms) {
  return new Promise((r) => setTimeout(r, ms));
}
