// Probes a running `npm run demo` the way a newcomer meets it: opens the printed URL in headless Chromium, waits
// for the workbench, and checks that the Countercheck extension activated in its extension host and that the
// demo's README is the open editor. Prints what it found; exits 0 when all holds, 1 otherwise.
// Usage: node scripts/real-host/probe-demo.mjs [DEMO_DIR]   (DEMO_DIR holds last-run.json; default ~/.cache/countercheck-demo)
import { existsSync, readdirSync, readFileSync, statSync, mkdtempSync, rmSync } from 'node:fs';
import { homedir, tmpdir } from 'node:os';
import { join } from 'node:path';
import { chromiumPath, sleep } from './host.mjs';

const dir = process.argv[2] ?? process.env.COUNTERCHECK_DEMO_DIR ?? join(process.env.XDG_CACHE_HOME ?? join(homedir(), '.cache'), 'countercheck-demo');
const info = JSON.parse(readFileSync(join(dir, 'last-run.json'), 'utf8'));

/** Every file under `root` (the host's log folder is nested by date and window). */
function filesUnder(root) {
  if (!existsSync(root)) return [];
  return readdirSync(root).flatMap((name) => {
    const p = join(root, name);
    return statSync(p).isDirectory() ? filesUnder(p) : [p];
  });
}

const activated = () => filesUnder(info.logs)
  .filter((f) => /exthost/i.test(f))
  .some((f) => /activat\w*.*countercheck\.countercheck|countercheck\.countercheck.*activat/i.test(readFileSync(f, 'utf8')));

const response = await fetch(info.url);
console.log(`probe: ${info.url.split('?')[0]} answered HTTP ${response.status}`);
let ok = response.status === 200;

const { chromium } = await import('playwright-core');
const profile = mkdtempSync(join(tmpdir(), 'countercheck-probe-'));
const context = await chromium.launchPersistentContext(profile, {
  executablePath: chromiumPath, headless: true, viewport: { width: 1400, height: 900 },
  args: ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
});
try {
  const page = context.pages()[0] ?? (await context.newPage());
  await page.goto(info.url);
  await page.waitForSelector('.monaco-workbench', { timeout: 90_000 });
  let active = false;
  for (let i = 0; i < 120 && !active; i++) {
    active = activated();
    if (!active) await sleep(500);
  }
  console.log(`probe: workbench loaded; Countercheck extension ${active ? 'activated' : 'NOT activated'} (host logs ${info.logs})`);
  ok &&= active;
  // The workbench opens the README once it has restored its layout: on a loaded machine that can come well after
  // the extension activated, so wait for it (up to a minute) rather than read the tabs once.
  let tabs = [];
  let readme = false;
  for (let i = 0; i < 120 && !readme; i++) {
    tabs = await page.locator('.tabs-container .tab').allInnerTexts().catch(() => []);
    readme = tabs.some((t) => /README/.test(t));
    if (!readme) await sleep(500);
  }
  console.log(`probe: open editors: ${tabs.map((t) => t.replace(/\s+/g, ' ').trim()).join(' | ') || '(none)'}`);
  ok &&= readme;
  if (process.env.COUNTERCHECK_PROBE_SCREENSHOT) await page.screenshot({ path: process.env.COUNTERCHECK_PROBE_SCREENSHOT });
} catch (e) {
  console.log(`probe: ${String(e?.message ?? e).split('\n')[0]}`);
  ok = false;
} finally {
  await context.close();
  rmSync(profile, { recursive: true, force: true });
}
console.log(`probe: demo ${ok ? 'OK' : 'FAILED'}`);
process.exit(ok ? 0 : 1);
