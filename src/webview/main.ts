// The results panel. Renders the payload the host computed (no statistics here), with text set through
// textContent only and colours from --vscode-* variables. Survives reloads through vscode.setState.
import type { HostToWebview, PanelAction, PanelPayload, PanelState, Plot, ResultTable, WebviewToHost } from '../protocol';

interface VsCodeApi {
  postMessage(message: WebviewToHost): void;
  getState(): PanelState | undefined;
  setState(state: PanelState): void;
}
declare function acquireVsCodeApi(): VsCodeApi;

const vscode = acquireVsCodeApi();
const root = document.getElementById('root') as HTMLElement;

function el<K extends keyof HTMLElementTagNameMap>(tag: K, attrs: Record<string, string> = {}, ...children: (Node | string)[]): HTMLElementTagNameMap[K] {
  const node = document.createElement(tag);
  for (const [k, v] of Object.entries(attrs)) node.setAttribute(k, v);
  for (const child of children) node.append(typeof child === 'string' ? document.createTextNode(child) : child);
  return node;
}

function icon(name: string): HTMLElement {
  return el('span', { class: `codicon codicon-${name}`, 'aria-hidden': 'true' });
}

let s: (key: string, fallback: string) => string = (_k, f) => f;
let tipCount = 0;

/**
 * Gives an element its explanation (written in src/report/explanations.ts): shown on hover and on keyboard
 * focus (the element joins the tab order), read by screen readers through aria-describedby.
 */
function explainable<T extends HTMLElement>(node: T, text: string | undefined): T {
  if (!text) return node;
  const id = `tip-${++tipCount}`;
  node.classList.add('has-explain');
  if (!node.hasAttribute('tabindex') && node.tagName !== 'BUTTON') node.setAttribute('tabindex', '0');
  node.setAttribute('aria-describedby', id);
  node.append(el('span', { class: 'tip', role: 'tooltip', id }, text));
  // Near the right edge the tip opens leftwards, so it is never cut off by the panel's edge.
  const place = () => node.classList.toggle('tip-left', node.getBoundingClientRect().left > window.innerWidth / 2);
  node.addEventListener('mouseenter', place);
  node.addEventListener('focus', place);
  return node;
}

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
  if (payload.keyEstimate) header.append(el('p', { class: 'key-estimate', id: 'key-estimate' }, explainable(el('span', { class: 'key-label' }, payload.keyEstimate.label), payload.keyEstimate.explain), ' ', el('strong', {}, payload.keyEstimate.value)));
  if (payload.headlineEffect) header.append(el('p', { class: 'effect', id: 'headline-effect' }, payload.headlineEffect));
  if (payload.headlineAssumption) header.append(el('p', { class: 'failed-assumption', id: 'headline-assumption', role: 'note' }, icon('warning'), ` ${payload.headlineAssumption}`));
  if (payload.apaLine) header.append(el('p', { class: 'apa', id: 'apa-line' }, payload.apaLine));
  header.append(el('p', { class: 'source' }, icon('database'), ` ${payload.sourceDescription}`));
  if (payload.familyLine) header.append(el('p', { class: 'source family', id: 'family-line' }, icon('layers'), ` ${payload.familyLine}`));
  root.append(header, actionBar(payload));
  if (payload.comparison) root.append(renderComparison(payload));

  if (payload.keyFigures.length > 0) {
    const dl = el('dl', { class: 'figures' });
    for (const f of payload.keyFigures) dl.append(el('div', {}, explainable(el('dt', {}, f.label), f.explain), el('dd', {}, f.value)));
    root.append(dl);
  }
  if (payload.notices.length > 0) {
    const list = el('ul', { class: 'notices' });
    for (const n of payload.notices) list.append(explainable(el('li', { class: n.severity }, icon(n.severity === 'warning' ? 'warning' : 'info'), ` ${n.message}`), n.explain));
    root.append(list);
  }
  payload.tables.forEach((table, i) => root.append(renderTable(table, i)));
  if (payload.categoryOrder && payload.tables.length > 0) root.append(el('p', { class: 'category-order', id: 'category-order' }, icon('list-ordered'), ` ${payload.categoryOrder}`));
  if (payload.plots.length > 0) {
    const plots = el('section', { class: 'plots', 'aria-label': s('plots', 'Plots') });
    payload.plots.forEach((plot, i) => plots.append(renderPlot(plot, i, payload)));
    root.append(plots);
  }
  if (payload.otherStatistics.length > 0) {
    const section = el('section', { class: 'other' }, el('h2', {}, s('otherStatistics', 'Other statistics on the same data')));
    // A two-column list (name | value, note below the value) that takes any number of entries.
    const dl = el('dl', { class: 'two-column' });
    for (const o of payload.otherStatistics) {
      dl.append(explainable(el('dt', {}, o.name), o.explain));
      const dd = el('dd', {}, el('span', { class: 'value' }, o.value));
      if (o.note) dd.append(el('span', { class: 'note' }, o.note));
      dl.append(dd);
    }
    section.append(dl);
    root.append(section);
  }
  if (payload.assumptions.length > 0) root.append(renderAssumptions(payload));
  if (payload.caution) root.append(el('p', { class: 'caution', role: 'note' }, icon('law'), ` ${payload.caution}`));
}

function actionBar(payload: PanelPayload): HTMLElement {
  const bar = el('nav', { class: 'actions', 'aria-label': s('actions', 'Actions') });
  const actions: [PanelAction, string, string, boolean][] = [
    ['copy-text', 'copy', s('copyText', 'Copy text'), true],
    ['copy-markdown', 'markdown', s('copyMarkdown', 'Copy markdown'), true],
    ['insert', 'insert', s('insert', 'Insert into document'), true],
    ['save-spec', 'save', s('saveSpec', 'Save as test file'), payload.canSave],
    ['rerun', 'refresh', s('rerun', 'Re-run'), payload.canRerun],
    ['open-new', 'split-horizontal', s('openNew', 'Open in new panel'), true],
  ];
  for (const [action, codicon, label, enabled] of actions) {
    const button = el('button', { type: 'button', 'data-action': action }, icon(codicon), ` ${label}`);
    if (!enabled) button.setAttribute('disabled', '');
    button.addEventListener('click', () => vscode.postMessage({ type: 'action', action }));
    bar.append(button);
  }
  // Feedback sits right beside the buttons, where the eye is after a click.
  bar.append(el('span', { class: 'status', id: 'status', role: 'status', 'aria-live': 'polite' }));
  return bar;
}

function renderTable(table: ResultTable, index: number): HTMLElement {
  const t = el('table', { class: 'counts' });
  const copy = el('button', { type: 'button', class: 'copy-table', 'data-table-index': String(index), title: s('copyTableHint', 'Copy as tab-separated cells: pastes into a spreadsheet as cells') }, icon('copy'), ` ${s('copyTable', 'Copy table')}`);
  copy.addEventListener('click', () => vscode.postMessage({ type: 'copy-table', index }));
  t.append(el('caption', {}, table.caption, ' ', copy));
  const head = el('tr');
  table.header.forEach((h, i) => head.append(explainable(el('th', { scope: 'col', class: i === 0 ? 'label' : '' }, h), table.headerExplain?.[i] || undefined)));
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

/** "Re-run and compare": the recorded result beside this run; changed values marked, a flipped conclusion highlighted. */
function renderComparison(payload: PanelPayload): HTMLElement {
  const c = payload.comparison!;
  const section = el('section', { class: `comparison${c.flipped ? ' flipped' : ''}`, id: 'comparison', 'aria-label': s('comparison', 'Compared with the recorded result') });
  section.append(el('h2', {}, icon(c.flipped ? 'warning' : 'history'), ` ${s('comparison', 'Compared with the recorded result')}: ${c.status}${c.flipped ? ` — ${s('conclusionFlipped', 'the conclusion flipped')}` : ''}`));
  const table = el('table', { class: 'counts compare' });
  table.append(el('thead', {}, el('tr', {}, el('th', { scope: 'col', class: 'label' }, ''), el('th', { scope: 'col' }, s('recorded', 'Recorded')), el('th', { scope: 'col' }, s('now', 'Now')))));
  const body = el('tbody');
  for (const r of c.rows) {
    const tr = el('tr', { class: `${r.changed ? 'changed' : ''}${r.flipped ? ' flipped' : ''}` }, el('th', { scope: 'row', class: 'label' }, r.quantity), el('td', {}, r.before), el('td', {}, r.after));
    if (r.changed) tr.lastElementChild?.append(el('span', { class: 'sign' }, ` ${s('changedMark', '(changed)')}`));
    body.append(tr);
  }
  table.append(body);
  section.append(el('div', { class: 'table-wrap' }, table));
  return section;
}

function renderAssumptions(payload: PanelPayload): HTMLElement {
  const section = el('section', { class: 'assumptions' }, el('h2', {}, s('assumptions', 'Assumptions')));
  const labels = { met: s('met', 'checked, met'), failed: s('failed', 'checked, not met'), unchecked: s('unchecked', 'cannot be checked from the data') };
  const icons = { met: 'pass', failed: 'error', unchecked: 'question' };
  for (const a of payload.assumptions) {
    const details = el('details', { class: `assumption ${a.status}`, 'data-id': a.id });
    const summary = explainable(el('summary', {}, icon(icons[a.status]), ` ${a.title} `, el('span', { class: 'state' }, `— ${labels[a.status]}`)), a.explain ?? a.explanation);
    details.append(summary, el('p', {}, a.explanation));
    if (a.alternative) {
      const used = a.alternative.startsWith('used here: ');
      details.append(el('p', { class: 'alternative' }, used ? `${s('usedHere', 'Used here')}: ${a.alternative.slice('used here: '.length)}` : `${s('alternative', 'Consider instead')}: ${a.alternative}`));
    }
    section.append(details);
  }
  return section;
}

// ---- plots: drawn as SVG text by src/report/svg.ts from the geometry in src/report/plots.ts; here the text
// is parsed as an SVG document (never as HTML) and placed in a figure. Colours come from the theme CSS.

function renderPlot(plot: Plot, index: number, payload: PanelPayload): HTMLElement {
  const figure = el('figure', { class: `plot ${plot.kind}`, 'data-plot-index': String(index) });
  const svgText = payload.plotSvgs?.[index];
  const parsed = svgText ? new DOMParser().parseFromString(svgText, 'image/svg+xml').documentElement : null;
  if (parsed && parsed.nodeName === 'svg') {
    const node = document.importNode(parsed, true);
    node.setAttribute('width', '100%');
    const description = payload.plotDescriptions?.[index];
    if (description) node.setAttribute('aria-label', description);
    figure.append(node);
  }
  const caption = el('figcaption', {}, plot.title);
  const save = el('button', { type: 'button', class: 'save-plot', 'data-plot-index': String(index), title: s('savePlotHint', 'Save this plot as an SVG or PNG file') }, icon('save'), ` ${s('savePlot', 'Save plot…')}`);
  save.addEventListener('click', () => vscode.postMessage({ type: 'save-plot', index }));
  caption.append(' ', save);
  figure.append(caption);
  return figure;
}

/** Draws a standalone SVG onto a canvas and returns PNG bytes as a data URL (for "Save plot" as PNG). */
function svgToPng(svgText: string, scale: number): Promise<string> {
  return new Promise((resolve, reject) => {
    const image = new Image();
    image.onload = () => {
      const canvas = document.createElement('canvas');
      canvas.width = Math.round(image.width * scale);
      canvas.height = Math.round(image.height * scale);
      const context = canvas.getContext('2d');
      if (!context) { reject(new Error('no 2d canvas')); return; }
      context.scale(scale, scale);
      context.drawImage(image, 0, 0);
      resolve(canvas.toDataURL('image/png'));
    };
    image.onerror = () => reject(new Error('the plot could not be drawn'));
    image.src = `data:image/svg+xml;base64,${btoa(unescape(encodeURIComponent(svgText)))}`;
  });
}

// ---- messages

window.addEventListener('message', (event: MessageEvent<HostToWebview>) => {
  const message = event.data;
  switch (message.type) {
    case 'show': render(message.payload); break;
    case 'busy': root.setAttribute('aria-busy', String(message.busy)); break;
    case 'render-png':
      svgToPng(message.svg, message.scale).then(
        (dataUrl) => vscode.postMessage({ type: 'png', requestId: message.requestId, dataUrl }),
        (e: unknown) => vscode.postMessage({ type: 'png', requestId: message.requestId, error: String(e) }),
      );
      break;
    case 'status': {
      const status = document.getElementById('status');
      if (status) { status.textContent = message.text; status.className = `status ${message.level}`; }
      break;
    }
  }
});

/** The saved state after a reload, unless the page was rebuilt with a newer result (a hidden panel reused). */
function initialPayload(): PanelPayload | undefined {
  const fromState = vscode.getState()?.payload;
  let fromPage: PanelPayload | undefined;
  const data = root.getAttribute('data-initial');
  try {
    fromPage = data ? (JSON.parse(data) as PanelState).payload : undefined;
  } catch {
    fromPage = undefined;
  }
  if (fromState && fromPage) return fromPage.computedAt > fromState.computedAt ? fromPage : fromState;
  return fromState ?? fromPage;
}

const initial = initialPayload();
if (initial) render(initial);
vscode.postMessage({ type: 'ready' });
