// After `vsce package`: installs the newest countercheck-*.vsix into a throwaway code-server extensions folder
// (the same installer a desktop VS Code uses for `--install-extension`) and fails if it does not install or
// lacks a file its manifest names; then starts a fresh browser-based VS Code with only that installed copy and
// runs test/vsix/index.ts in it (the walkthrough opens, its sample data command works).
import { existsSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { build } from 'esbuild';
import { join } from 'node:path';
import { alias } from '../bundle-options.mjs';
import { installVsix, launchBrowser, repoRoot, sleep, startHost, testPayloadUrl } from './host.mjs';

const vsix = readdirSync(repoRoot).filter((f) => /^countercheck-.*\.vsix$/.test(f)).map((f) => join(repoRoot, f)).sort((a, b) => statSync(b).mtimeMs - statSync(a).mtimeMs)[0];
if (!vsix) {
  console.error('no countercheck-*.vsix found; run `npm run package`');
  process.exit(1);
}
/** Files the installed extension must hold: its entry and lazy chunks, the icon, the l10n bundle and every walkthrough medium. */
function missingFiles(extensionsDir) {
  const folder = readdirSync(extensionsDir).find((n) => n.startsWith('countercheck.countercheck-'));
  if (!folder) return ['the extension folder'];
  const root = join(extensionsDir, folder);
  const manifest = JSON.parse(readFileSync(join(root, 'package.json'), 'utf8'));
  const media = manifest.contributes.walkthroughs.flatMap((w) => w.steps.map((s) => s.media.markdown ?? s.media.image));
  const images = media.filter((m) => m.endsWith('.md')).flatMap((m) => [...readFileSync(join(root, m), 'utf8').matchAll(/!\[[^\]]*\]\(([^)]+)\)/g)].map((x) => join(m, '..', x[1])));
  const needed = [manifest.main, manifest.icon, 'dist/pg.js', 'dist/htmlparser2.js', 'dist/webview.js', 'dist/scanWorker.js', 'l10n/bundle.l10n.json', 'package.nls.json', 'THIRD-PARTY-NOTICES.md', 'media/walkthrough/bakery-defects.csv', ...media, ...images];
  return needed.filter((f) => !existsSync(join(root, f)));
}

const { installed, inspection: missing } = installVsix(vsix, missingFiles);
if (missing.length > 0) {
  console.error(`${vsix} installs without: ${missing.join(', ')}`);
  process.exit(1);
}
if (!installed.some((n) => n.startsWith('countercheck.countercheck-'))) {
  console.error(`${vsix} did not install (extensions folder holds: ${installed.join(', ') || 'nothing'})`);
  process.exit(1);
}
console.log(`${vsix} (${(statSync(vsix).size / 1024).toFixed(0)} KB) installs with code-server --install-extension: ${installed.join(', ')}`);

/** The installed copy in a fresh host: test/vsix/index.ts runs as the extension tests of a probe extension. */
async function walkthroughInInstalledCopy() {
  const temp = mkdtempSync(join(tmpdir(), 'countercheck-vsix-run-'));
  let host;
  let context;
  try {
    const extensions = join(temp, 'extensions');
    mkdirSync(extensions);
    installVsix(vsix, () => {}, extensions);
    // The host runs extension tests only for a development extension: an empty probe stands in for it.
    const probe = join(temp, 'probe');
    mkdirSync(probe);
    writeFileSync(join(probe, 'package.json'), JSON.stringify({ name: 'vsix-probe', publisher: 'countercheck', version: '0.0.0', engines: { vscode: '^1.99.0' } }));
    await build({ entryPoints: [join(repoRoot, 'test', 'vsix', 'index.ts')], outfile: join(probe, 'out', 'index.js'), alias, bundle: true, platform: 'node', format: 'cjs', target: 'node20', external: ['vscode'], logLevel: 'warning' });
    host = await startHost({ extensionsDir: extensions, copyWorkspaceFrom: join(repoRoot, 'demo') });
    context = await launchBrowser(host);
    const page = context.pages()[0] ?? (await context.newPage());
    let resolveExit;
    const exited = new Promise((r) => { resolveExit = r; });
    await page.exposeFunction('codeAutomationExit', (code) => resolveExit(Number(code)));
    await page.exposeFunction('codeAutomationLog', (type, args) => {
      const line = Array.isArray(args) ? args.map((a) => (typeof a === 'string' ? a : JSON.stringify(a))).join(' ') : String(args);
      if (/installed \.vsix|Error|error:/.test(line) && !/github|marketplace|telemetry|Failed to load resource/i.test(line)) console.log(line.split('\n').slice(0, 3).join('\n'));
    });
    await page.goto(testPayloadUrl(host, { extensionTestsPath: join(probe, 'out', 'index.js'), developmentPath: probe }));
    const outcome = await Promise.race([exited, sleep(180_000).then(() => 'timeout')]);
    if (outcome !== 0) throw new Error(outcome === 'timeout' ? 'the installed copy did not finish its check within 180 s' : `the installed copy's check failed (exit ${outcome})`);
  } finally {
    await context?.close().catch(() => {});
    await host?.stop();
    host?.cleanup();
    rmSync(temp, { recursive: true, force: true });
  }
}

try {
  await walkthroughInInstalledCopy();
} catch (e) {
  console.error(`${vsix}: ${e.message}`);
  process.exit(1);
}
