/**
 * Plots as SVG text, drawn from the geometry in ./plots. One renderer for two uses:
 * - `standalone`: a file that travels (saved plots, report blocks, notebooks, `countercheck run --plots`):
 *   600 px wide, theme-neutral ink on white, a title, axes, `<title>`/`<desc>` for screen readers, and the
 *   tail hatched so it survives black-and-white printing;
 * - `panel`: the same drawing for the results panel, coloured by the panel's theme CSS through class names,
 *   the tail hatched in high-contrast themes.
 * Every text is escaped here; the webview imports the result as an SVG document (no HTML parsing). Pure.
 */
import type { DensityPlot, DeviationPlot, IntervalPlot, Plot, PowerCurvePlot, ResidualGridPlot } from '../protocol';
import type { Result } from '../stats/result';
import { plotsForResult } from './plots';

export interface SvgOptions {
  /** 'standalone' for a file, 'panel' for the webview (no colours of its own). Default standalone. */
  readonly mode?: 'standalone' | 'panel';
  /** Prefix for element ids, unique within the page that shows several plots. Default "cc". */
  readonly idPrefix?: string;
}

/** Width of every plot, in px (readable at 600 px: ticks 11 px, labels 12 px, title 14 px). */
export const PLOT_WIDTH = 600;

const STANDALONE_STYLE = [
  'text{font-family:"Segoe UI",Helvetica,Arial,sans-serif;fill:#1a1a1a}',
  '.title{font-size:14px;font-weight:600}',
  '.tick{font-size:11px;fill:#4a4a4a}',
  '.label{font-size:12px}',
  '.axis,.grid{stroke:#6b6b6b;stroke-width:1}',
  '.grid{stroke-opacity:.35}',
  '.curve{fill:none;stroke:#1a1a1a;stroke-width:1.8}',
  '.tail{fill:#e08a2c;fill-opacity:.45;stroke:#b86a14;stroke-width:1}',
  '.hatch-line{stroke:#7a4306;stroke-width:1.2}',
  '.critical{stroke:#4a4a4a;stroke-dasharray:4 3}',
  '.observed{stroke:#c0262d;stroke-width:2}',
  '.marker-label{font-size:12px;font-weight:600}',
  '.band{fill:#8a8a8a;fill-opacity:.18}',
  '.zero{stroke:#1a1a1a;stroke-width:1.4}',
  '.stem{stroke-width:3}',
  '.above{stroke:#c4620f;fill:#c4620f}',
  '.below{stroke:#2a62a8;fill:#2a62a8}',
  '.none{stroke:#4a4a4a;fill:#4a4a4a}',
  '.cell{stroke:#b5b5b5;fill:#ffffff}',
  '.cell.tint-above{fill:#e08a2c}',
  '.cell.tint-below{fill:#3d7cc9}',
  '.cell-label{font-size:12px}',
  '.strong{font-weight:700}',
  '.interval{stroke:#2a62a8;stroke-width:3;fill:#2a62a8}',
  '.estimate{fill:#2a62a8}',
  '.reference{stroke:#c0262d;stroke-width:2;stroke-dasharray:5 3}',
  '.power{fill:none;stroke:#2a62a8;stroke-width:2}',
  '.marker{fill:#c0262d}',
].join('');

/** Escapes text for SVG/XML content and double-quoted attributes. */
export function escapeXml(text: string): string {
  return text.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;').replace(/'/g, '&apos;');
}

type Attrs = Record<string, string | number | undefined>;

function tag(name: string, attrs: Attrs, content?: string): string {
  const a = Object.entries(attrs)
    .filter(([, v]) => v !== undefined)
    .map(([k, v]) => ` ${k}="${escapeXml(typeof v === 'number' ? round(v) : String(v))}"`)
    .join('');
  return content === undefined ? `<${name}${a}/>` : `<${name}${a}>${content}</${name}>`;
}

function text(attrs: Attrs, content: string): string {
  return tag('text', attrs, escapeXml(content));
}

function round(x: number): string {
  return String(Math.round(x * 100) / 100);
}

function points(list: readonly { x: number; y: number }[]): string {
  return list.map((p) => `${round(p.x)},${round(p.y)}`).join(' ');
}

interface Drawing {
  readonly height: number;
  readonly body: string;
  readonly description: string;
}

const M = { l: 56, r: 20, t: 44, b: 48 };

function xAxis(ticks: readonly number[], labels: readonly string[], sx: (x: number) => number, y: number, label: string | undefined): string {
  const parts = [tag('line', { x1: M.l, x2: PLOT_WIDTH - M.r, y1: y, y2: y, class: 'axis' })];
  ticks.forEach((t, i) => {
    parts.push(tag('line', { x1: sx(t), x2: sx(t), y1: y, y2: y + 4, class: 'axis' }));
    parts.push(text({ x: sx(t), y: y + 17, class: 'tick', 'text-anchor': 'middle' }, labels[i] ?? ''));
  });
  if (label) parts.push(text({ x: PLOT_WIDTH - M.r, y: y + 36, class: 'label', 'text-anchor': 'end' }, label));
  return parts.join('');
}

function density(plot: DensityPlot, hatch: string): Drawing {
  const height = 260;
  const sx = (x: number) => M.l + ((x - plot.xMin) / (plot.xMax - plot.xMin || 1)) * (PLOT_WIDTH - M.l - M.r);
  const sy = (y: number) => height - M.b - (y / (plot.yMax || 1)) * (height - M.t - M.b);
  const parts: string[] = [];
  plot.shaded.forEach((poly, k) => {
    const scaled = poly.map((p) => ({ x: sx(p.x), y: sy(p.y) }));
    const pts = points(scaled);
    parts.push(tag('polygon', { points: pts, class: 'tail' }), hatched(scaled, `${hatch}${k === 0 ? '' : `-${k + 1}`}`));
  });
  parts.push(tag('polyline', { points: points(plot.curve.map((p) => ({ x: sx(p.x), y: sy(p.y) }))), class: 'curve' }));
  for (const c of plot.critical) parts.push(tag('line', { x1: sx(c), x2: sx(c), y1: M.t, y2: height - M.b, class: 'critical' }));
  parts.push(xAxis(plot.ticks, plot.tickLabels, sx, height - M.b, plot.xLabel));
  let where = '';
  if (plot.observed) {
    const ox = sx(plot.observed.x);
    parts.push(tag('line', { x1: ox, x2: ox, y1: M.t - 6, y2: height - M.b, class: 'observed' }));
    const anchor = ox > PLOT_WIDTH * 0.65 ? 'end' : 'start';
    parts.push(text({ x: ox + (anchor === 'end' ? -5 : 5), y: M.t - 10, class: 'marker-label', 'text-anchor': anchor }, `${plot.observed.label}${plot.observed.clipped ? ' (beyond the axis)' : ''}`));
    where = ` Marked: ${plot.observed.label}.`;
  }
  const description = `${plot.title}.${where} Shaded and hatched: the tail the p-value counts. Dashed: critical value${plot.critical.length === 1 ? '' : 's'} at α.`;
  return { height, body: parts.join(''), description };
}

function deviation(plot: DeviationPlot): Drawing {
  const rowHeight = 30;
  const labelWidth = Math.min(220, Math.max(90, 7 * Math.max(...plot.rows.map((r) => r.label.length), 4)));
  const left = labelWidth + 12;
  const right = PLOT_WIDTH - 150;
  const top = M.t + 6;
  const height = top + plot.rows.length * rowHeight + M.b;
  const sx = (x: number) => left + ((x - plot.xMin) / (plot.xMax - plot.xMin || 1)) * (right - left);
  const parts: string[] = [];
  plot.rows.forEach((r, i) => {
    const y = top + i * rowHeight + rowHeight / 2;
    parts.push(tag('rect', { x: sx(-r.band), y: y - 9, width: Math.max(0, sx(r.band) - sx(-r.band)), height: 18, class: 'band' }));
    const cls = `stem ${r.shade.sign}${r.shade.level > 0 ? ' strong' : ''}`;
    parts.push(tag('line', { x1: sx(0), x2: sx(r.deviation), y1: y, y2: y, class: cls }));
    parts.push(tag('circle', { cx: sx(r.deviation), cy: y, r: 4.5, class: r.shade.sign }));
    parts.push(text({ x: labelWidth, y: y + 4, class: 'label', 'text-anchor': 'end' }, r.label));
    parts.push(text({ x: right + 10, y: y + 4, class: `tick${r.shade.level > 0 ? ' strong' : ''}` }, r.text));
  });
  parts.push(tag('line', { x1: sx(0), x2: sx(0), y1: top - 4, y2: height - M.b, class: 'zero' }));
  const axisY = height - M.b;
  parts.push(tag('line', { x1: left, x2: right, y1: axisY, y2: axisY, class: 'axis' }));
  plot.ticks.forEach((t, i) => {
    parts.push(tag('line', { x1: sx(t), x2: sx(t), y1: axisY, y2: axisY + 4, class: 'axis' }));
    parts.push(text({ x: sx(t), y: axisY + 17, class: 'tick', 'text-anchor': 'middle' }, plot.tickLabels[i] ?? ''));
  });
  parts.push(text({ x: right, y: axisY + 36, class: 'label', 'text-anchor': 'end' }, plot.xLabel));
  const outside = plot.rows.filter((r) => Math.abs(r.deviation) > r.band).map((r) => r.label);
  const description = `${plot.title}. ${plot.rows.map((r) => `${r.label}: observed ${r.observedText}, expected ${r.expectedText}, ${r.text}`).join('; ')}. ${outside.length ? `Outside the band: ${outside.join(', ')}.` : 'Every category lies inside the band.'}`;
  return { height, body: parts.join(''), description };
}

/** Column labels longer than fit a cell are written in several lines (never cut). */
function wrapLabel(label: string, perLine: number): string[] {
  const words = label.split(/\s+/);
  const lines: string[] = [];
  let current = '';
  for (const word of words) {
    if (current && (current + ' ' + word).length > perLine) {
      lines.push(current);
      current = word;
    } else current = current ? `${current} ${word}` : word;
  }
  if (current) lines.push(current);
  // A single word longer than the cell is split into pieces of the line length.
  return lines.flatMap((l) => (l.length <= perLine ? [l] : l.match(new RegExp(`.{1,${perLine}}`, 'g')) ?? [l]));
}

function grid(plot: ResidualGridPlot): Drawing {
  const cols = plot.columnLabels.length;
  const rows = plot.rowLabels.length;
  const rowLabelWidth = Math.min(200, Math.max(80, 7 * Math.max(4, ...plot.rowLabels.map((l) => l.length))));
  const cell = Math.max(44, Math.min(96, Math.floor((PLOT_WIDTH - rowLabelWidth - 24) / Math.max(1, cols))));
  const perLine = Math.max(4, Math.floor(cell / 6.5));
  const headers = plot.columnLabels.map((c) => wrapLabel(c, perLine));
  const headerLines = Math.max(1, ...headers.map((h) => h.length));
  const top = M.t + headerLines * 14 + 4;
  const height = top + rows * 32 + 16;
  const left = rowLabelWidth + 12;
  const parts: string[] = [];
  headers.forEach((lines, j) => {
    const x = left + j * cell + cell / 2;
    lines.forEach((line, k) => parts.push(text({ x, y: top - 6 - (lines.length - 1 - k) * 14, class: 'tick', 'text-anchor': 'middle' }, line)));
  });
  plot.rowLabels.forEach((label, i) => {
    const y = top + i * 32;
    parts.push(text({ x: rowLabelWidth, y: y + 20, class: 'label', 'text-anchor': 'end' }, label));
    plot.shades[i].forEach((shade, j) => {
      parts.push(tag('rect', { x: left + j * cell + 1, y: y + 1, width: cell - 2, height: 30, class: `cell tint-${shade.sign}`, 'fill-opacity': shade.sign === 'none' ? undefined : shade.strength }));
      parts.push(text({ x: left + j * cell + cell / 2, y: y + 20, class: `cell-label${shade.level >= 2 ? ' strong' : ''}`, 'text-anchor': 'middle' }, plot.labels[i]?.[j] ?? ''));
    });
  });
  const notable = plot.rowLabels.flatMap((r, i) => plot.columnLabels.flatMap((c, j) => (plot.shades[i][j].level > 0 ? [`${r} × ${c} ${plot.labels[i][j]}`] : [])));
  const description = `${plot.title}, ${rows} rows × ${cols} columns; orange above and blue below expectation, deeper beyond the 5 %, 1 % and 0.1 % normal points. ${notable.length ? `Beyond ±1.96: ${notable.join(', ')}.` : 'No cell beyond ±1.96.'}`;
  return { height, body: parts.join(''), description };
}

function interval(plot: IntervalPlot): Drawing {
  const height = 150;
  const sx = (x: number) => M.l + ((x - plot.xMin) / (plot.xMax - plot.xMin || 1)) * (PLOT_WIDTH - M.l - M.r);
  const y = M.t + 32;
  const parts: string[] = [];
  const x1 = sx(plot.lower);
  const x2 = sx(plot.upper);
  parts.push(tag('line', { x1, x2, y1: y, y2: y, class: 'interval' }));
  // A closed end is a bar; an open end (one-sided bound) is an arrowhead at the axis edge.
  if (plot.openLower) parts.push(tag('polygon', { points: `${round(x1 - 2)},${y} ${round(x1 + 9)},${y - 6} ${round(x1 + 9)},${y + 6}`, class: 'interval' }));
  else parts.push(tag('line', { x1, x2: x1, y1: y - 9, y2: y + 9, class: 'interval' }));
  if (plot.openUpper) parts.push(tag('polygon', { points: `${round(x2 + 2)},${y} ${round(x2 - 9)},${y - 6} ${round(x2 - 9)},${y + 6}`, class: 'interval' }));
  else parts.push(tag('line', { x1: x2, x2, y1: y - 9, y2: y + 9, class: 'interval' }));
  parts.push(tag('circle', { cx: sx(plot.estimate), cy: y, r: 5, class: 'estimate' }));
  const rx = sx(plot.reference);
  parts.push(tag('line', { x1: rx, x2: rx, y1: M.t + 2, y2: y + 20, class: 'reference' }));
  parts.push(text({ x: rx + (rx > PLOT_WIDTH * 0.7 ? -5 : 5), y: M.t + 10, class: 'marker-label', 'text-anchor': rx > PLOT_WIDTH * 0.7 ? 'end' : 'start' }, plot.texts.reference));
  parts.push(xAxis(plot.ticks, plot.tickLabels, sx, height - M.b + 8, plot.parameter));
  const shown = `${plot.openLower ? '(' : '['}${plot.texts.lower}, ${plot.texts.upper}${plot.openUpper ? ')' : ']'}`;
  const description = `${plot.title}: ${shown}${plot.openLower || plot.openUpper ? ', a one-sided bound (the arrow runs on without end)' : ''}; s = ${plot.texts.estimate}; ${plot.texts.reference} ${plot.referenceInside ? 'inside' : 'outside'} the interval.`;
  return { height, body: parts.join(''), description };
}

function power(plot: PowerCurvePlot): Drawing {
  const height = 280;
  const top = M.t + 20;
  const sx = (x: number) => M.l + ((x - plot.xMin) / (plot.xMax - plot.xMin || 1)) * (PLOT_WIDTH - M.l - M.r);
  const sy = (y: number) => height - M.b - y * (height - top - M.b);
  const parts: string[] = [];
  plot.yTicks.forEach((t, i) => {
    parts.push(tag('line', { x1: M.l, x2: PLOT_WIDTH - M.r, y1: sy(t), y2: sy(t), class: 'grid' }));
    parts.push(text({ x: M.l - 6, y: sy(t) + 4, class: 'tick', 'text-anchor': 'end' }, plot.yTickLabels[i] ?? ''));
  });
  parts.push(text({ x: M.l - 6, y: top - 14, class: 'label', 'text-anchor': 'end' }, 'power'));
  parts.push(tag('polyline', { points: points(plot.curve.map((p) => ({ x: sx(p.x), y: sy(p.y) }))), class: 'power' }));
  parts.push(xAxis(plot.ticks, plot.tickLabels, sx, height - M.b, plot.xLabel));
  const mx = sx(plot.marker.x);
  const my = sy(plot.marker.y);
  parts.push(tag('line', { x1: mx, x2: mx, y1: my, y2: height - M.b, class: 'critical' }), tag('line', { x1: M.l, x2: mx, y1: my, y2: my, class: 'critical' }));
  parts.push(tag('circle', { cx: mx, cy: my, r: 5, class: 'marker' }));
  const anchor = mx > PLOT_WIDTH * 0.6 ? 'end' : 'start';
  parts.push(text({ x: mx + (anchor === 'end' ? -8 : 8), y: my + 20, class: 'marker-label', 'text-anchor': anchor }, plot.marker.label));
  const first = plot.curve[0];
  const last = plot.curve[plot.curve.length - 1];
  const description = `${plot.title}. Power goes from ${first.y.toFixed(2)} at n = ${first.x} to ${last.y.toFixed(2)} at n = ${last.x}; marked: ${plot.marker.label}.`;
  return { height, body: parts.join(''), description };
}

/**
 * Diagonal hatching over a shaded area: always in a file (it prints in black and white), in high contrast in the
 * panel (CSS). Lines 6 px apart at 45°, clipped to the area's own outline.
 */
function hatched(area: readonly { x: number; y: number }[], id: string): string {
  if (area.length < 3) return '';
  const xs = area.map((p) => p.x);
  const ys = area.map((p) => p.y);
  const [x0, x1, y0, y1] = [Math.min(...xs), Math.max(...xs), Math.min(...ys), Math.max(...ys)];
  const lines: string[] = [];
  for (let c = x0 - (y1 - y0); c <= x1; c += 6) lines.push(tag('line', { x1: c, y1: y1, x2: c + (y1 - y0), y2: y0, class: 'hatch-line' }));
  return tag('clipPath', { id }, tag('polygon', { points: points(area) })) + tag('g', { class: 'tail-hatch', 'clip-path': `url(#${id})` }, lines.join(''));
}

function drawingFor(plot: Plot, hatch: string): Drawing {
  switch (plot.kind) {
    case 'density': return density(plot, hatch);
    case 'deviation': return deviation(plot);
    case 'residual-grid': return grid(plot);
    case 'interval': return interval(plot);
    case 'power-curve': return power(plot);
  }
}

/** The plot's text alternative (what `<desc>` and the panel's aria-label say). */
export function plotDescription(plot: Plot): string {
  return drawingFor(plot, 'h').description;
}

/** One plot as SVG text; see the module comment for the two modes. */
export function renderPlotSvg(plot: Plot, options: SvgOptions = {}): string {
  const mode = options.mode ?? 'standalone';
  const id = options.idPrefix ?? 'cc';
  const hatch = `${id}-hatch`;
  const drawing = drawingFor(plot, hatch);
  const head = [
    tag('title', { id: `${id}-title` }, escapeXml(plot.title)),
    tag('desc', { id: `${id}-desc` }, escapeXml(drawing.description)),
  ];
  if (mode === 'standalone') {
    head.push(tag('style', {}, STANDALONE_STYLE));
    head.push(tag('rect', { x: 0, y: 0, width: PLOT_WIDTH, height: drawing.height, fill: '#ffffff' }));
    head.push(text({ x: 16, y: 22, class: 'title' }, plot.title));
  }
  return tag(
    'svg',
    {
      xmlns: 'http://www.w3.org/2000/svg',
      width: mode === 'standalone' ? PLOT_WIDTH : undefined,
      height: mode === 'standalone' ? drawing.height : undefined,
      viewBox: `0 0 ${PLOT_WIDTH} ${drawing.height}`,
      role: 'img',
      'aria-labelledby': `${id}-title ${id}-desc`,
      class: `plot-svg plot-${plot.kind}`,
    },
    head.join('') + drawing.body,
  );
}

/** A file name for a plot: "<base>-<n>-<kind>.svg". */
export function plotFileName(base: string, index: number, plot: Plot): string {
  const safe = base.replace(/\.countercheck\.json$/i, '').replace(/[^\p{L}\p{N}._-]+/gu, '-').replace(/^-+|-+$/g, '') || 'plot';
  return `${safe}-${index + 1}-${plot.kind}.svg`;
}

/** Every plot of a result as files to write: `<spec base>-<n>-<kind>.svg` with its standalone SVG. */
export function plotFiles(result: Result, base: string, decimals = 2): { readonly name: string; readonly title: string; readonly svg: string }[] {
  return plotsForResult(result, decimals).map((plot, i) => ({ name: plotFileName(base, i, plot), title: plot.title, svg: renderPlotSvg(plot, { idPrefix: `cc${i + 1}` }) }));
}
