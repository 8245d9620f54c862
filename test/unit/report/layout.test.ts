// The panel uses its width: laid out by Chromium at 1,200 px with the panel's own style sheet and webview
// script (dist/webview.js, from `npm run build`), a cross-tab of 8 columns (label, 6 categories, total) with long
// category names does not scroll sideways, and the residual grid writes every column label in full.
import { strict as assert } from 'node:assert';
import { wordResult } from '../../../src/report/words/result';
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { STYLE } from '../../../src/host/panelStyle';
import { buildPanelPayload } from '../../../src/report/panel';
import { independenceTest } from '../../../src/stats/procedures/table';

const bundle = join(__dirname, '..', '..', '..', 'dist', 'webview.js');

describe('panel layout', () => {
  it('an 8-column table fits 1,200 px without horizontal scrolling; grid labels are never cut', async function () {
    this.timeout(120_000);
    if (!existsSync('/usr/bin/chromium')) this.skip();
    assert.ok(existsSync(bundle), 'dist/webview.js is missing: run `npm run build`');
    const columns = ['misshapen crust', 'underbaked centre', 'burnt edges', 'cracked glaze', 'collapsed middle', 'uneven rise'];
    const observed = [[12, 5, 9, 7, 4, 6], [7, 14, 6, 9, 8, 5], [9, 8, 21, 6, 7, 9]];
    const result = wordResult(independenceTest(observed, { rowLabels: ['Oven A', 'Oven B', 'Oven C'], columnLabels: columns }));
    const payload = buildPanelPayload(result, { id: 'r1', title: 'Ovens', sourceDescription: 'ovens.csv', decimals: 2, canSave: true, canRerun: true });
    assert.equal(payload.tables[0].header.length, 8);
    const html = `<!DOCTYPE html><html><head><style>:root{--vscode-font-family:sans-serif;--vscode-font-size:13px;--vscode-editor-font-family:monospace;--vscode-foreground:#222;--vscode-editor-background:#fff;--vscode-charts-orange:#d18616;--vscode-charts-blue:#1a85ff;--vscode-descriptionForeground:#666}</style><style>${STYLE}</style></head>
<body><main id="root"></main><script>window.acquireVsCodeApi=()=>({postMessage(){},getState(){},setState(){}});</script><script>${readFileSync(bundle, 'utf8')}</script>
<script>window.postMessage({type:'show',payload:${JSON.stringify(payload).replace(/</g, '\\u003c')}},'*')</script></body></html>`;
    const { chromium } = await import('playwright-core');
    const browser = await chromium.launch({ executablePath: '/usr/bin/chromium', headless: true, args: ['--no-sandbox', '--disable-gpu', '--no-first-run'] });
    try {
      const page = await browser.newPage({ viewport: { width: 1200, height: 900 } });
      await page.setContent(html);
      await page.waitForSelector('#headline');
      const widths = (await page.evaluate(`[...document.querySelectorAll('.table-wrap')].map((w) => [w.scrollWidth, w.clientWidth])`)) as [number, number][];
      assert.ok(widths.length >= 1);
      for (const [scroll, client] of widths) assert.ok(scroll <= client, `table scrolls sideways: ${scroll} px of content in ${client} px`);
      const page2 = (await page.evaluate(`[document.documentElement.scrollWidth, document.documentElement.clientWidth]`)) as [number, number];
      assert.ok(page2[0] <= page2[1], `the page scrolls sideways: ${page2[0]} > ${page2[1]}`);
      const gridText = (await page.evaluate(`document.querySelector('figure.residual-grid svg').textContent`)) as string;
      for (const c of columns) for (const word of c.split(' ')) assert.ok(gridText.includes(word), `grid label word "${word}" of "${c}"`);
      assert.doesNotMatch(gridText, /…/, 'no label cut with an ellipsis');
    } finally {
      await browser.close();
    }
  });
});
