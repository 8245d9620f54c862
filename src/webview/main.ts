// The results panel. Renders the payload the host computed (no statistics here), with text set through
// textContent only and colours from --vscode-* variables. Survives reloads through vscode.setState.
import type { BarsPlot, DensityPlot, HostToWebview, IntervalPlot, PanelAction, PanelPayload, PanelState, Plot, ResidualGridPlot, ResultTable, WebviewToHost } from '../protocol';

interface VsCodeApi {
  postMessage(message: WebviewToHost): void;
  getState(): PanelState | undefined;
  setState(state: PanelState): void;
}
declare function acquireVsCodeApi(): VsCodeApi;

const vscode = acquireVsCodeApi();
const SVG = 'http://www.w3.org/2000/svg';
const root = document.getElementById('root') as HTMLElement;

function el<K extends keyof HTMLElementTagNameMap>(tag: K, attrs: Record<string, string> = {}, ...children: (Node | string)[]): HTMLElementTagNameMap[K] {
  const node = document.createElement(tag);
  for (const [k, v] of Object.entries(attrs)) node.setAttribute(k, v);
  for (const child of children) node.append(typeof child === 'string' ? document.createTextNode(child) : child);
  return node;
}

function svg(tag: string, attrs: Record<string, string | number> = {}, text?: string): SVGElement {
  const node = document.createElementNS(SVG, tag);
  for (const [k, v] of Object.entries(attrs)) node.setAttribute(k, String(v));
  if (text !== undefined) node.textContent = text;
  return node;
}

function icon(name: string): HTMLElement {
  return el('span', { class: `codicon codicon-${name}`, 'aria-hidden': 'true' });
}

let s: (key: string, fallback: string) => string = (_k, f) => f;

function render(payload: PanelPayload): void {
  s = (key, fallback) => payload.strings[key] ?? fallback;
  vscode.setState({ payload });
  root.replaceChildren();
  root.setAttribute('aria-busy', 'false');

  const verdict = payload.significant === null ? 'neutral' : payload.significant ? 'signal' : 'quiet';
  const header = el('header', { class: `headline ${verdict}` });
  header.append(
    el('div', { class: 'eyebrow' }, icon(verdict === 'signal' ? 'pulse' : verdict === 'quiet' ? 'circle-large-outline' : 'graph-line'), ` ${payload.title}`),
    el('h1', { id: 'headline' }, payload.headline),
  );
  if (payload.keyEstimate) header.append(el('p', { class: 'key-estimate', id: 'key-estimate' }, el('span', { class: 'key-label' }, payload.keyEstimate.label), ' ', el('strong', {}, payload.keyEstimate.value)));
  if (payload.headlineEffect) header.append(el('p', { class: 'effect', id: 'headline-effect' }, payload.headlineEffect));
  if (payload.headlineAssumption) header.append(el('p', { class: 'failed-assumption', id: 'headline-assumption', role: 'note' }, icon('warning'), ` ${payload.headlineAssumption}`));
  if (payload.apaLine) header.append(el('p', { class: 'apa', id: 'apa-line' }, payload.apaLine));
  header.append(el('p', { class: 'source' }, icon('database'), ` ${payload.sourceDescription}`));
  root.append(header, actionBar(payload));

  if (payload.keyFigures.length > 0) {
    const dl = el('dl', { class: 'figures' });
    for (const f of payload.keyFigures) dl.append(el('div', {}, el('dt', {}, f.label), el('dd', {}, f.value)));
    root.append(dl);
  }
  if (payload.notices.length > 0) {
    const list = el('ul', { class: 'notices' });
    for (const n of payload.notices) list.append(el('li', { class: n.severity }, icon(n.severity === 'warning' ? 'warning' : 'info'), ` ${n.message}`));
    root.append(list);
  }
  for (const table of payload.tables) root.append(renderTable(table));
  if (payload.plots.length > 0) {
    const plots = el('section', { class: 'plots', 'aria-label': s('plots', 'Plots') });
    for (const plot of payload.plots) plots.append(renderPlot(plot));
    root.append(plots);
  }
  if (payload.otherStatistics.length > 0) {
    const section = el('section', { class: 'other' }, el('h2', {}, s('otherStatistics', 'Other statistics on the same data')));
    const dl = el('dl', { class: 'figures compact' });
    for (const o of payload.otherStatistics) dl.append(el('div', {}, el('dt', {}, o.name), el('dd', {}, o.value)));
    section.append(dl);
    root.append(section);
  }
  if (payload.assumptions.length > 0) root.append(renderAssumptions(payload));
  if (payload.caution) root.append(el('p', { class: 'caution', role: 'note' }, icon('law'), ` ${payload.caution}`));
  root.append(el('p', { class: 'status', id: 'status', role: 'status', 'aria-live': 'polite' }));
}

function actionBar(payload: PanelPayload): HTMLElement {
  const bar = el('nav', { class: 'actions', 'aria-label': s('actions', 'Actions') });
  const actions: [PanelAction, string, string, boolean][] = [
    ['copy-text', 'copy', s('copyText', 'Copy text'), true],
    ['copy-markdown', 'markdown', s('copyMarkdown', 'Copy markdown'), true],
    ['insert', 'insert', s('insert', 'Insert into document'), true],
    ['save-spec', 'save', s('saveSpec', 'Save as test file'), payload.canSave],
    ['rerun', 'refresh', s('rerun', 'Re-run'), payload.canRerun],
  ];
  for (const [action, codicon, label, enabled] of actions) {
    const button = el('button', { type: 'button', 'data-action': action }, icon(codicon), ` ${label}`);
    if (!enabled) button.setAttribute('disabled', '');
    button.addEventListener('click', () => vscode.postMessage({ type: 'action', action }));
    bar.append(button);
  }
  return bar;
}

function renderTable(table: ResultTable): HTMLElement {
  const t = el('table', { class: 'counts' });
  t.append(el('caption', {}, table.caption));
  const head = el('tr');
  table.header.forEach((h, i) => head.append(el('th', { scope: 'col', class: i === 0 ? 'label' : '' }, h)));
  t.append(el('thead', {}, head));
  const body = el('tbody');
  for (const row of table.rows) {
    const tr = el('tr', {}, el('th', { scope: 'row', class: 'label' }, row.label));
    for (const cell of row.cells) {
      const td = el('td', {}, cell.text);
      if (cell.shade && cell.shade.sign !== 'none') {
        td.classList.add(`tint-${cell.shade.sign}`, `band-${cell.shade.level}`);
        td.style.setProperty('--tint', `${Math.round(cell.shade.strength * 100)}%`);
      }
      if (cell.signText) td.append(el('span', { class: 'sign' }, ` ${cell.signText}`));
      tr.append(td);
    }
    body.append(tr);
  }
  t.append(body);
  return el('div', { class: 'table-wrap', tabindex: '0', role: 'region', 'aria-label': table.caption }, t);
}

function renderAssumptions(payload: PanelPayload): HTMLElement {
  const section = el('section', { class: 'assumptions' }, el('h2', {}, s('assumptions', 'Assumptions')));
  const labels = { met: s('met', 'checked, met'), failed: s('failed', 'checked, not met'), unchecked: s('unchecked', 'cannot be checked from the data') };
  const icons = { met: 'pass', failed: 'error', unchecked: 'question' };
  for (const a of payload.assumptions) {
    const details = el('details', { class: `assumption ${a.status}`, 'data-id': a.id });
    const summary = el('summary', { title: a.explanation }, icon(icons[a.status]), ` ${a.title} `, el('span', { class: 'state' }, `— ${labels[a.status]}`));
    details.append(summary, el('p', {}, a.explanation));
    if (a.alternative) {
      const used = a.alternative.startsWith('used here: ');
      details.append(el('p', { class: 'alternative' }, used ? `${s('usedHere', 'Used here')}: ${a.alternative.slice('used here: '.length)}` : `${s('alternative', 'Consider instead')}: ${a.alternative}`));
    }
    section.append(details);
  }
  return section;
}

// ---- plots: geometry and every label come from src/report/plots.ts; here numbers are only mapped to pixels.
// A panel saved by an older version has no label strings: its plots are drawn without them (`?.`).

const W = 520;
const H = 200;
const M = { l: 44, r: 14, t: 28, b: 34 };

function figure(plot: Plot, body: SVGElement, description: string): HTMLElement {
  body.setAttribute('role', 'img');
  body.setAttribute('aria-label', description);
  return el('figure', { class: `plot ${plot.kind}` }, body, el('figcaption', {}, plot.title));
}

function renderPlot(plot: Plot): HTMLElement {
  switch (plot.kind) {
    case 'density': return densityFigure(plot);
    case 'bars': return barsFigure(plot);
    case 'residual-grid': return gridFigure(plot);
    case 'interval': return intervalFigure(plot);
  }
}

function frame(width = W, height = H): SVGElement {
  return svg('svg', { viewBox: `0 0 ${width} ${height}`, width: '100%', preserveAspectRatio: 'xMidYMid meet' });
}

function xAxis(g: SVGElement, plot: { readonly ticks: readonly number[]; readonly tickLabels: readonly string[] }, sx: (x: number) => number, y: number, label?: string): void {
  g.append(svg('line', { x1: M.l, x2: W - M.r, y1: y, y2: y, class: 'axis' }));
  plot.ticks.forEach((t, i) => {
    g.append(svg('line', { x1: sx(t), x2: sx(t), y1: y, y2: y + 4, class: 'axis' }));
    g.append(svg('text', { x: sx(t), y: y + 15, class: 'tick', 'text-anchor': 'middle' }, plot.tickLabels?.[i] ?? ''));
  });
  if (label) g.append(svg('text', { x: W - M.r, y: y + 28, class: 'tick', 'text-anchor': 'end' }, label));
}

function densityFigure(plot: DensityPlot): HTMLElement {
  const root = frame();
  const sx = (x: number) => M.l + ((x - plot.xMin) / (plot.xMax - plot.xMin)) * (W - M.l - M.r);
  const sy = (y: number) => H - M.b - (y / plot.yMax) * (H - M.t - M.b);
  for (const poly of plot.shaded) root.append(svg('polygon', { points: poly.map((p) => `${sx(p.x)},${sy(p.y)}`).join(' '), class: 'tail' }));
  root.append(svg('polyline', { points: plot.curve.map((p) => `${sx(p.x)},${sy(p.y)}`).join(' '), class: 'curve' }));
  for (const c of plot.critical) root.append(svg('line', { x1: sx(c), x2: sx(c), y1: M.t, y2: H - M.b, class: 'critical' }));
  xAxis(root, plot, sx, H - M.b, plot.xLabel);
  const ox = sx(plot.observed.x);
  root.append(svg('line', { x1: ox, x2: ox, y1: M.t - 4, y2: H - M.b, class: 'observed' }));
  // The label sits above the plot area, so it never crosses the curve.
  const anchor = ox > W * 0.7 ? 'end' : 'start';
  root.append(svg('text', { x: ox + (anchor === 'end' ? -4 : 4), y: M.t - 8, class: 'marker-label', 'text-anchor': anchor }, `${plot.observed.label}${plot.observed.clipped ? ' →' : ''}`));
  const description = `${plot.title}. ${s('observedMarked', 'Observed statistic marked at')} ${plot.observed.label}; ${s('tailShaded', 'shaded area: the tail the p-value counts')}.`;
  const fig = figure(plot, root, description);
  fig.querySelector('figcaption')?.append(document.createTextNode(` — ${s('tailShaded', 'shaded area: the tail the p-value counts')}; ${s('criticalDashed', 'dashed: critical value at α')}`));
  return fig;
}

function barsFigure(plot: BarsPlot): HTMLElement {
  const root = frame();
  const n = plot.bars.length;
  const band = (W - M.l - M.r) / Math.max(1, n);
  const sy = (y: number) => H - M.b - (y / plot.yMax) * (H - M.t - M.b);
  plot.ticks.forEach((t, i) => {
    root.append(svg('line', { x1: M.l, x2: W - M.r, y1: sy(t), y2: sy(t), class: 'grid' }));
    root.append(svg('text', { x: M.l - 6, y: sy(t) + 4, class: 'tick', 'text-anchor': 'end' }, plot.tickLabels?.[i] ?? ''));
  });
  plot.bars.forEach((b, i) => {
    const x0 = M.l + i * band + band * 0.15;
    const w = band * 0.34;
    root.append(svg('rect', { x: x0, y: sy(b.observed), width: w, height: sy(0) - sy(b.observed), class: 'bar-observed' }));
    root.append(svg('rect', { x: x0 + w, y: sy(b.expected), width: w, height: sy(0) - sy(b.expected), class: 'bar-expected' }));
    root.append(svg('text', { x: x0 + w, y: H - M.b + 15, class: 'tick', 'text-anchor': 'middle' }, b.label.length > 12 ? `${b.label.slice(0, 11)}…` : b.label));
  });
  root.append(svg('line', { x1: M.l, x2: W - M.r, y1: sy(0), y2: sy(0), class: 'axis' }));
  const legend = svg('g', { class: 'legend' });
  legend.append(svg('rect', { x: W - 190, y: 4, width: 10, height: 10, class: 'bar-observed' }), svg('text', { x: W - 176, y: 13, class: 'tick' }, s('observed', 'observed')));
  legend.append(svg('rect', { x: W - 100, y: 4, width: 10, height: 10, class: 'bar-expected' }), svg('text', { x: W - 86, y: 13, class: 'tick' }, s('expected', 'expected')));
  root.append(legend);
  return figure(plot, root, `${plot.title}: ${plot.bars.map((b) => `${b.label} ${b.observedText ?? ''} / ${b.expectedText ?? ''}`).join(', ')}`);
}

function gridFigure(plot: ResidualGridPlot): HTMLElement {
  const cols = plot.columnLabels.length;
  const rows = plot.rowLabels.length;
  const cell = Math.min(64, Math.floor((W - 120) / Math.max(1, cols)));
  const width = 120 + cols * cell + 10;
  const height = 26 + rows * 30 + 6;
  const root = svg('svg', { viewBox: `0 0 ${width} ${height}`, width: String(width), height: String(height) });
  plot.columnLabels.forEach((c, j) => root.append(svg('text', { x: 120 + j * cell + cell / 2, y: 16, class: 'tick', 'text-anchor': 'middle' }, c.length > 8 ? `${c.slice(0, 7)}…` : c)));
  plot.rowLabels.forEach((r, i) => {
    const y = 26 + i * 30;
    root.append(svg('text', { x: 112, y: y + 19, class: 'tick', 'text-anchor': 'end' }, r.length > 16 ? `${r.slice(0, 15)}…` : r));
    plot.shades[i].forEach((shade, j) => {
      const rect = svg('rect', { x: 120 + j * cell + 1, y: y + 1, width: cell - 2, height: 28, class: `cell tint-${shade.sign}` });
      (rect as SVGElement & ElementCSSInlineStyle).style.setProperty('--tint', `${Math.round(shade.strength * 100)}%`);
      root.append(rect);
      root.append(svg('text', { x: 120 + j * cell + cell / 2, y: y + 19, class: `cell-label band-${shade.level}`, 'text-anchor': 'middle' }, plot.labels?.[i]?.[j] ?? ''));
    });
  });
  return figure(plot, root, `${plot.title}, ${rows} × ${cols}`);
}

function intervalFigure(plot: IntervalPlot): HTMLElement {
  const height = 90;
  const root = frame(W, height);
  const sx = (x: number) => M.l + ((x - plot.xMin) / (plot.xMax - plot.xMin)) * (W - M.l - M.r);
  const y = 34;
  root.append(svg('line', { x1: sx(plot.lower), x2: sx(plot.upper), y1: y, y2: y, class: 'interval' }));
  for (const end of [plot.lower, plot.upper]) root.append(svg('line', { x1: sx(end), x2: sx(end), y1: y - 8, y2: y + 8, class: 'interval' }));
  root.append(svg('circle', { cx: sx(plot.estimate), cy: y, r: 5, class: 'estimate' }));
  root.append(svg('line', { x1: sx(plot.reference), x2: sx(plot.reference), y1: 10, y2: y + 18, class: 'reference' }));
  root.append(svg('text', { x: sx(plot.reference) + 5, y: 16, class: 'marker-label' }, plot.texts?.reference ?? ''));
  xAxis(root, plot, sx, height - 34, plot.parameter);
  const where = plot.referenceInside ? s('insideInterval', 'inside the interval') : s('outsideInterval', 'outside the interval');
  return figure(plot, root, plot.texts ? `${plot.title}: ${plot.texts.lower} to ${plot.texts.upper}; s = ${plot.texts.estimate}; ${plot.texts.reference} ${where}` : plot.title);
}

// ---- messages

window.addEventListener('message', (event: MessageEvent<HostToWebview>) => {
  const message = event.data;
  switch (message.type) {
    case 'show': render(message.payload); break;
    case 'busy': root.setAttribute('aria-busy', String(message.busy)); break;
    case 'status': {
      const status = document.getElementById('status');
      if (status) { status.textContent = message.text; status.className = `status ${message.level}`; }
      break;
    }
  }
});

function initialPayload(): PanelPayload | undefined {
  const fromState = vscode.getState()?.payload;
  if (fromState) return fromState;
  const data = root.getAttribute('data-initial');
  if (!data) return undefined;
  try {
    return (JSON.parse(data) as PanelState).payload;
  } catch {
    return undefined;
  }
}

const initial = initialPayload();
if (initial) render(initial);
vscode.postMessage({ type: 'ready' });
