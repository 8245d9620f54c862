// Plots that travel: every plot of the demo results drawn as a standalone SVG file is well-formed XML with
// a title, a text alternative and a 600 px width, escapes what it is given, and Chromium (the browser the
// real-host tests drive) parses it without error and draws it to a PNG of the expected size.
import { strict as assert } from 'node:assert';
import { existsSync, readFileSync } from 'node:fs';
import { basename, join } from 'node:path';
import { aggregateFile } from '../../../src/data/file';
import { parseReportBlocks } from '../../../src/report/blocks';
import { plotFolderName, withPlotLinks } from '../../../src/report/markdown';
import { runReportBlock } from '../../../src/savedtest/living';
import type { SpecReaders } from '../../../src/savedtest/types';
import type { Plot } from '../../../src/protocol';
import { deviationPlot, plotsForResult } from '../../../src/report/plots';
import { PLOT_WIDTH, escapeXml, plotFileName, renderPlotSvg } from '../../../src/report/svg';
import { demoFolder, demoResult } from './demoResults';

const DEMOS = [
  'bottling-fill-spread.countercheck.json',
  'advanced/seedling-blight-exact.countercheck.json',
  'bakery-flavour-mix.countercheck.json',
  'advanced/cask-spread-power.countercheck.json',
  'audit-critical-values.countercheck.json',
];

async function demoPlots(): Promise<{ file: string; plot: Plot; svg: string }[]> {
  const all: { file: string; plot: Plot; svg: string }[] = [];
  for (const file of DEMOS) {
    const { result } = await demoResult(file);
    for (const plot of plotsForResult(result)) all.push({ file, plot, svg: renderPlotSvg(plot) });
  }
  return all;
}

// Run inside Chromium (written as source text: the unit tests are compiled without the DOM library).
const PARSE_IN_BROWSER = `(text) => {
  const doc = new DOMParser().parseFromString(text, 'image/svg+xml');
  return { root: doc.documentElement.nodeName, errors: doc.getElementsByTagName('parsererror').length };
}`;
const DRAW_IN_BROWSER = `async (text) => {
  const image = new Image();
  image.src = 'data:image/svg+xml;base64,' + btoa(unescape(encodeURIComponent(text)));
  await image.decode();
  const canvas = document.createElement('canvas');
  canvas.width = image.width;
  canvas.height = image.height;
  const context = canvas.getContext('2d');
  context.drawImage(image, 0, 0);
  const data = context.getImageData(0, 0, canvas.width, canvas.height).data;
  let ink = 0;
  for (let i = 0; i < data.length; i += 4) if (data[i] < 128) ink++;
  return { width: image.width, height: image.height, png: canvas.toDataURL('image/png'), ink };
}`;

function heightOf(svg: string): number {
  return Number(/^<svg[^>]* height="(\d+(?:\.\d+)?)"/.exec(svg)?.[1]);
}

describe('standalone SVG plots', () => {
  it('living report blocks link to plot files beside the report, and demo/report.plots holds them as drawn now', async () => {
    assert.equal(plotFolderName('/w/docs/report.md'), 'report.plots');
    assert.equal(withPlotLinks('**x**\n', [{ link: 'r.plots/a b.svg', alt: 'χ² [df]' }]), '**x**\n\n![χ² \\[df\\]](r.plots/a%20b.svg)\n');
    assert.equal(withPlotLinks('x\n', []), 'x\n');
    const reportPath = join(demoFolder, 'report.md');
    const text = readFileSync(reportPath, 'utf8');
    const readers: SpecReaders = { aggregateFile: (p, request, options, control) => aggregateFile(p, request, options, { signal: control.signal }) };
    let files = 0;
    for (const block of parseReportBlocks(text)) {
      const run = await runReportBlock(block, { reportPath, readers, readText: async (f) => readFileSync(f, 'utf8'), allowedRoot: demoFolder });
      assert.ok(run.plots.length > 0, `block ${block.index + 1} has plots`);
      for (const plot of run.plots) {
        const link = `report.plots/${basename(plot.file)}`;
        assert.ok(run.markdown.includes(`](${link})`), `block ${block.index + 1} links ${link}`);
        assert.ok(text.includes(`](${link})`), `demo/report.md links ${link}`);
        assert.equal(readFileSync(plot.file, 'utf8'), plot.svg, `${link} is current: run \`node dist/cli.js report demo/report.md\``);
        files++;
      }
    }
    assert.equal(files, 6);
  });

  it('every kind of plot is drawn from the demo results, with title, description and a 600 px width', async () => {
    const plots = await demoPlots();
    assert.deepEqual([...new Set(plots.map((p) => p.plot.kind))].sort(), ['density', 'deviation', 'interval', 'power-curve', 'residual-grid']);
    for (const { file, plot, svg } of plots) {
      assert.match(svg, /^<svg xmlns="http:\/\/www\.w3\.org\/2000\/svg" width="600" height="\d+"/, `${file} ${plot.kind}`);
      assert.match(svg, /<title id="cc-title">[^<]+<\/title><desc id="cc-desc">[^<]{20,}<\/desc>/, `${file} ${plot.kind}: title and desc`);
      assert.ok(heightOf(svg) >= 100 && heightOf(svg) <= 900, `${file} ${plot.kind}: height ${heightOf(svg)}`);
      assert.doesNotMatch(svg, /var\(--vscode/, 'theme-neutral: no editor variables in a file');
      assert.doesNotMatch(svg, /NaN|undefined/, `${file} ${plot.kind}: no NaN or undefined in the drawing`);
    }
  });

  it('the one-sided bound of the bottling test is drawn open-ended, the tail hatched', async () => {
    const plots = await demoPlots();
    const interval = plots.find((p) => p.file.startsWith('bottling') && p.plot.kind === 'interval');
    assert.ok(interval && interval.plot.kind === 'interval');
    assert.equal(interval.plot.openUpper, true);
    assert.match(interval.svg, /a one-sided bound/);
    const density = plots.find((p) => p.file.startsWith('bottling') && p.plot.kind === 'density');
    assert.match(density?.svg ?? '', /<clipPath id="cc-hatch"><polygon points="[^"]+"\/><\/clipPath><g class="tail-hatch" clip-path="url\(#cc-hatch\)"><line /);
    // df = 899: the axis starts at the bulk of χ²(899) (0.1 % point ≈ 760), not at 0.
    assert.ok(density?.plot.kind === 'density' && density.plot.xMin > 700, 'density around the bulk');
  });

  it('escapes labels, and names files after the spec', () => {
    assert.equal(escapeXml(`a<b & "c" 'd'>`), 'a&lt;b &amp; &quot;c&quot; &apos;d&apos;&gt;');
    const plot = deviationPlot([
      { label: '<script>&', observed: 10, expected: 8, pearsonResidual: 0.7, standardizedResidual: 1, contribution: 0.5 },
      { label: 'b"q', observed: 6, expected: 8, pearsonResidual: -0.7, standardizedResidual: -1, contribution: 0.5 },
    ]);
    const svg = renderPlotSvg(plot);
    assert.ok(!svg.includes('<script'), 'no raw label markup');
    assert.match(svg, /&lt;script&gt;&amp;/);
    assert.equal(plotFileName('fill.countercheck.json', 0, plot), 'fill-1-deviation.svg');
    assert.equal(plotFileName('Bottling line: spread?', 1, plot), 'Bottling-line-spread-2-deviation.svg');
  });

  it('Chromium parses each SVG as XML and draws it to a PNG of the expected size', async function () {
    this.timeout(120_000);
    const chromiumPath = '/usr/bin/chromium';
    if (!existsSync(chromiumPath)) this.skip();
    const plots = await demoPlots();
    const { chromium } = await import('playwright-core');
    const browser = await chromium.launch({ executablePath: chromiumPath, headless: true, args: ['--no-sandbox', '--disable-gpu', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'] });
    try {
      const page = await browser.newPage({ viewport: { width: 800, height: 1000 } });
      for (const { file, plot, svg } of plots) {
        const parsed = (await page.evaluate(`(${PARSE_IN_BROWSER})(${JSON.stringify(svg)})`)) as { root: string; errors: number };
        assert.deepEqual(parsed, { root: 'svg', errors: 0 }, `${file} ${plot.kind}: well-formed SVG`);
        const size = (await page.evaluate(`(${DRAW_IN_BROWSER})(${JSON.stringify(svg)})`)) as { width: number; height: number; png: string; ink: number };
        assert.equal(size.width, PLOT_WIDTH, `${file} ${plot.kind}: width`);
        assert.equal(size.height, heightOf(svg), `${file} ${plot.kind}: height`);
        const bytes = Buffer.from(size.png.replace(/^data:image\/png;base64,/, ''), 'base64');
        assert.equal(bytes.subarray(1, 4).toString('latin1'), 'PNG');
        assert.equal(bytes.readUInt32BE(16), PLOT_WIDTH, 'PNG header width');
        assert.equal(bytes.readUInt32BE(20), heightOf(svg), 'PNG header height');
        assert.ok(size.ink > 500, `${file} ${plot.kind}: something was drawn (${size.ink} dark pixels)`);
      }
    } finally {
      await browser.close();
    }
  });
});
