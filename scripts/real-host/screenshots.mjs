// UI test: drives the command palette of a real workbench in headless Chromium, as a keyboard user would,
// checks the results panel's text, reloads the page and checks the panel comes back, and saves
// screenshots of the panel in light, dark and high-contrast themes under media/.
// Exit code 0 when every check passed; prints "N passing" / "N failing" like the mocha runs.
import { mkdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { launchBrowser, repoRoot, sleep, startHost, testPayloadUrl } from './host.mjs';

const themes = [
  { name: 'light', theme: 'Default Light Modern', scheme: 'light' },
  { name: 'dark', theme: 'Default Dark Modern', scheme: 'dark' },
  { name: 'high-contrast', theme: 'Default High Contrast', scheme: 'dark' },
];
// Screenshots go to media/ (for the README) only with --update-media; a plain test run keeps them in a temp folder.
const update = process.argv.includes('--update-media');
const only = process.argv.slice(2).filter((a) => !a.startsWith('--'));
const media = update ? join(repoRoot, 'media') : join(tmpdir(), 'countercheck-screenshots');
mkdirSync(media, { recursive: true });

let passing = 0;
const failures = [];
let currentPage;
async function check(name, fn) {
  try {
    await fn();
    passing++;
    console.log(`    ✔ ${name}`);
  } catch (e) {
    failures.push([name, e]);
    const shot = join(tmpdir(), `countercheck-ui-failure-${failures.length}.png`);
    await currentPage?.screenshot({ path: shot }).catch(() => {});
    console.log(`      (screen at failure: ${shot})`);
    console.log(`    ✗ ${name}: ${String(e?.message ?? e).split('\n')[0]}`);
  }
}

async function palette(page, title) {
  await page.keyboard.press('F1');
  await page.waitForSelector('.quick-input-widget', { state: 'visible' });
  await page.keyboard.type(title, { delay: 15 });
  await sleep(700);
  // Enter only when the highlighted entry is the command asked for (a hidden command would otherwise run its nearest match).
  const label = await page.locator('.quick-input-list .monaco-list-row.focused .label-name').first().textContent().catch(() => '');
  const wanted = title.replace(/^.*?: /, '');
  if (!label || !label.replace(/\s+/g, ' ').includes(wanted)) {
    await page.keyboard.press('Escape');
    throw new Error(`the command palette offers "${label}" for "${title}"`);
  }
  await page.keyboard.press('Enter');
  await closed(page);
}

/** Opens a file with Quick Open; retries while the file index is still being built after start-up. */
async function quickOpen(page, file) {
  for (let attempt = 1; ; attempt++) {
    await page.keyboard.press('Control+P');
    await page.waitForSelector('.quick-input-widget', { state: 'visible' });
    await page.keyboard.type(file, { delay: 15 });
    await sleep(1200 * attempt);
    await page.keyboard.press('Enter');
    try {
      // The window title names the active editor first; a panel titled "… — file.csv" is not the file.
      await page.waitForFunction((name) => document.title.includes(`] ${name} - `) || document.title.startsWith(`${name} - `), file, { timeout: 3000 });
      return;
    } catch (e) {
      await page.keyboard.press('Escape');
      if (attempt === 4) throw new Error(`Quick Open did not open ${file}: ${e?.message ?? e}`);
    }
  }
}

/** Answers the next QuickPick or input box by typing and pressing Enter. */
/**
 * After Enter the quick input closes and the next question opens in the same widget: wait until it has closed
 * (bounded, since the next one may replace it at once), so the next answer is not typed into the closing one.
 */
async function closed(page) {
  await page.waitForSelector('.quick-input-widget', { state: 'hidden', timeout: 2000 }).catch(() => {});
}

async function answer(page, text) {
  await page.waitForSelector('.quick-input-widget', { state: 'visible' });
  await sleep(300);
  if (text) await page.keyboard.type(text, { delay: 15 });
  await sleep(400);
  await page.keyboard.press('Enter');
  await closed(page);
}

/** Gives the panel the whole window for the screenshot (one editor group, side bar hidden), then brings the side bar back. */
async function maximized(page, shoot) {
  await palette(page, 'View: Join All Editor Groups');
  await sleep(600);
  await page.keyboard.press('Control+B');
  await sleep(1200);
  await shoot();
  await page.keyboard.press('Control+B');
  await sleep(400);
}

/** Opens a data file, runs "Test This Data File…" from the palette and answers each question by typing. */
async function testFileByKeyboard(page, file, answers, headline) {
  await palette(page, 'View: Join All Editor Groups');
  await quickOpen(page, file);
  await palette(page, 'Countercheck: Test This Data File');
  for (const text of answers) await answer(page, text);
  await waitForPanel(page, headline);
  await sleep(800);
}

function panelFrame(page) {
  return page.frameLocator('iframe.webview').last().frameLocator('#active-frame');
}

/** Waits until the newest panel's headline matches (a panel being replaced or opened may show the older one for a moment). */
async function waitForPanel(page, pattern) {
  const deadline = Date.now() + 30_000;
  let text = '';
  for (;;) {
    const headline = panelFrame(page).locator('#headline');
    await headline.waitFor({ state: 'visible', timeout: Math.max(1000, deadline - Date.now()) });
    text = (await headline.textContent().catch(() => '')) ?? '';
    if (pattern.test(text)) return text;
    if (Date.now() > deadline) throw new Error(`panel headline "${text}" does not match ${pattern}`);
    await sleep(500);
  }
}

async function session({ name, theme, scheme }) {
  console.log(`  ${name} theme`);
  const host = await startHost({
    copyWorkspaceFrom: join(repoRoot, 'demo'),
    extraCopies: [[join(repoRoot, 'test', 'integration', 'data'), 'integration-data']],
    settings: { 'workbench.colorTheme': theme, 'window.autoDetectColorScheme': false, 'editor.minimap.enabled': false, 'workbench.activityBar.location': 'default' },
  });
  let context;
  try {
    context = await launchBrowser(host, { colorScheme: scheme, viewport: { width: 1500, height: 1000 } });
    const page = context.pages()[0] ?? (await context.newPage());
    currentPage = page;
    // The panel's nonce CSP must not refuse anything the panel itself loads (scripts, styles, codicon font).
    const refused = [];
    page.on('console', (m) => { if (/Refused to|Content Security Policy/i.test(m.text()) && /webview|vscode-cdn|vscode-resource|codicon|nonce/i.test(m.text())) refused.push(m.text()); });
    await page.goto(testPayloadUrl(host));
    await page.waitForSelector('.monaco-workbench', { timeout: 60_000 });
    await page.waitForSelector('.statusbar', { timeout: 60_000 });
    await sleep(3500);

    await check(`${name}: palette runs the test on a counted table`, async () => {
      await quickOpen(page, 'oven-defects.csv');
      await palette(page, 'Countercheck: Test This Data File');
      // Every procedure that fits is offered; independence, the first, is already highlighted; then its sampling
      // plan for the Bayes factor, "only the grand total fixed" highlighted.
      await answer(page, '');
      await answer(page, '');
      await waitForPanel(page, /associated/);
      const apa = await panelFrame(page).locator('#apa-line').textContent();
      if (!/χ²\(4, N = 91\) = 13\.79/.test(apa ?? '')) throw new Error(`APA line "${apa}"`);
      await sleep(800);
      await maximized(page, () => page.screenshot({ path: join(media, `panel-table-${name}.png`) }));
    });

    await check(`${name}: every key figure explains itself on keyboard focus`, async () => {
      const figure = panelFrame(page).locator('dl.figures dt.has-explain').first();
      await figure.focus();
      const tip = panelFrame(page).locator('dl.figures dt.has-explain:focus .tip');
      await tip.waitFor({ state: 'visible', timeout: 5000 });
      const text = await tip.textContent();
      if (!/Pearson|statistic/i.test(text ?? '')) throw new Error(`tooltip "${text}"`);
      const unexplained = await panelFrame(page).locator('dl.figures dt:not(.has-explain)').count();
      if (unexplained > 1) throw new Error(`${unexplained} key figures without an explanation`);
    });

    await check(`${name}: the bottling example's headline names the failed assumption and its robust bound`, async () => {
      await quickOpen(page, 'bottling-fill-spread.countercheck.json');
      await palette(page, 'Countercheck: Open the Result of This Saved Test');
      await waitForPanel(page, /“fill_ml”/);
      const assumption = await panelFrame(page).locator('#headline-assumption').textContent();
      if (!/Normality is doubtful here.*only just excludes σ0 = 1\.250/.test(assumption ?? '')) throw new Error(`headline assumption "${assumption}"`);
      // The one-sided bound is drawn open-ended (an arrowhead), and a high-contrast theme hatches the tail.
      const arrows = await panelFrame(page).locator('figure.interval svg polygon.interval').count();
      if (arrows !== 1) throw new Error(`expected one arrowhead on the one-sided bound, found ${arrows}`);
      const hatch = await panelFrame(page).locator('figure.density svg .tail-hatch').first().evaluate((n) => getComputedStyle(n).display);
      if ((name === 'high-contrast') !== (hatch !== 'none')) throw new Error(`tail hatching display "${hatch}" in the ${name} theme`);
      await sleep(600);
      await maximized(page, () => page.screenshot({ path: join(media, `panel-headline-${name}.png`) }));
    });

    await check(`${name}: the panel's content security policy refuses nothing it needs`, async () => {
      if (refused.length) throw new Error(refused.slice(0, 3).join(' | '));
    });

    if (name === 'light') {
      await check(`${name}: the variance flow is keyboard-only through QuickPicks`, async () => {
        await testFileByKeyboard(page, 'bike-trips.csv', ['Variance of one', 'trip_minutes', '6', ''], /standard deviation|variance/i);
        await maximized(page, () => page.screenshot({ path: join(media, `panel-variance-${name}.png`) }));
      });

      await check(`${name}: the last answers for a file are offered first (Enter four times repeats the variance test)`, async () => {
        await testFileByKeyboard(page, 'bike-trips.csv', ['', '', '', ''], /σ0 = 6/);
      });

      await check(`${name}: goodness of fit with equal proportions`, async () => {
        await testFileByKeyboard(page, 'bike-trips.csv', ['Goodness of fit', 'dock', 'Equal proportions'], /proportions/i);
        // The deviation chart: one marker per dock, over its ±1.96 SD band.
        const markers = await panelFrame(page).locator('figure.deviation svg circle').count();
        if (markers < 4) throw new Error(`expected a deviation marker per dock, found ${markers}`);
        const header = await panelFrame(page).locator('table.counts thead th').allTextContents();
        if (!/Observed − expected/.test(header.join('|'))) throw new Error(`table header ${header.join(' | ')}`);
        await maximized(page, () => page.screenshot({ path: join(media, `panel-fit-${name}.png`) }));
      });

      await check(`${name}: Copy table answers beside the buttons; Save plot is offered under each plot`, async () => {
        await panelFrame(page).locator('button.copy-table').first().click();
        const status = panelFrame(page).locator('#status');
        await page.waitForTimeout(800);
        const text = await status.textContent();
        if (!/tab-separated/.test(text ?? '')) throw new Error(`status "${text}"`);
        const inBar = await panelFrame(page).locator('nav.actions #status').count();
        if (inBar !== 1) throw new Error('the status is not beside the buttons');
        const saves = await panelFrame(page).locator('figure.plot button.save-plot').count();
        const plots = await panelFrame(page).locator('figure.plot').count();
        if (saves !== plots || plots < 2) throw new Error(`${saves} Save plot buttons for ${plots} plots`);
      });

      await check(`${name}: assumptions open from the keyboard`, async () => {
        const summary = panelFrame(page).locator('details.assumption summary').first();
        await summary.focus();
        await summary.press('Enter');
        const open = await panelFrame(page).locator('details.assumption').first().getAttribute('open');
        if (open === null) throw new Error('the first assumption did not open with Enter');
      });

      await check(`${name}: the panel comes back after a reload`, async () => {
        await page.reload();
        await page.waitForSelector('.monaco-workbench', { timeout: 60_000 });
        await sleep(4000);
        await waitForPanel(page, /equal proportions/i);
      });

      await check(`${name}: the lookup asks what is wanted first, draws the density, and one panel serves every lookup`, async () => {
        const before = await page.locator('.tab-label .label-name, .tab .label-name').allTextContents().catch(() => []);
        for (const df of ['4', '5']) {
          await palette(page, 'Countercheck: Look Up the Chi-Square Distribution');
          await answer(page, 'Critical value');
          await answer(page, df);
          await answer(page, '');
          await waitForPanel(page, new RegExp(`${df} degrees of freedom`));
          await sleep(500);
        }
        const tabs = await page.locator('.tab .label-name').allTextContents();
        const lookups = tabs.filter((t) => /χ² distribution/.test(t)).length;
        if (lookups !== 1) throw new Error(`expected one lookup tab, found ${lookups} (${tabs.join(', ')}; before ${before.join(', ')})`);
        const curves = await panelFrame(page).locator('figure.density svg polyline.curve').count();
        if (curves !== 1) throw new Error('the lookup draws no density');
        await maximized(page, () => page.screenshot({ path: join(media, `panel-lookup-${name}.png`) }));
      });

      await check(`${name}: the power plan shows its curve and neither assumptions nor the significance caution`, async () => {
        await quickOpen(page, 'cask-spread-power.countercheck.json');
        await palette(page, 'Countercheck: Open the Result of This Saved Test');
        await waitForPanel(page, /Power 0\.669/);
        const curve = await panelFrame(page).locator('figure.power-curve svg polyline.power').count();
        if (curve !== 1) throw new Error('no power curve');
        const assumptions = await panelFrame(page).locator('section.assumptions').count();
        const caution = (await panelFrame(page).locator('p.caution').textContent()) ?? '';
        if (assumptions !== 0 || /significance/i.test(caution)) throw new Error(`assumptions ${assumptions}, caution "${caution}"`);
        await maximized(page, () => page.screenshot({ path: join(media, `panel-power-${name}.png`) }));
      });
    }
  } finally {
    await context?.close().catch(() => {});
    await host.stop();
    host.cleanup();
  }
}

try {
  for (const t of themes) if (only.length === 0 || only.includes(t.name)) await session(t);
} catch (e) {
  failures.push(['host', e]);
  console.error(e);
}
console.log(`\n  ${passing} passing`);
if (failures.length) {
  console.log(`  ${failures.length} failing`);
  for (const [name, e] of failures) console.log(`  - ${name}: ${e?.stack ?? e}`);
}
process.exit(failures.length ? 1 : 0);
