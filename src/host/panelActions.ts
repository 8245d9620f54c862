// What the panel's buttons do: copy, insert at the cursor (or a markdown cell below in a notebook),
// save as a spec (never overwriting without showing the change), re-run.
import * as path from 'node:path';
import * as vscode from 'vscode';
import type { PanelAction, PanelOrigin } from '../protocol';
import { makeRecord } from '../savedtest/review';
import { runSpec } from '../savedtest/run';
import { toolName } from './commands/savedSpecs';
import { errorMessage } from '../errors';
import type { Plot } from '../protocol';
import { plotFolderName, withPlotLinks } from '../report/markdown';
import { tableToTsv } from '../report/tables';
import { plotFileName, renderPlotSvg } from '../report/svg';
import { specFileName } from './locations';
import type { ResultPanel } from './panel';
import { extensionReaders, settings, type Services } from './services';

const t = vscode.l10n.t;

/** The markdown editor or notebook the user was in before the panel took focus. */
let lastDocumentEditor: vscode.TextEditor | undefined;
let lastNotebookEditor: vscode.NotebookEditor | undefined;
export function trackEditors(context: vscode.ExtensionContext): void {
  lastDocumentEditor = vscode.window.activeTextEditor;
  lastNotebookEditor = vscode.window.activeNotebookEditor;
  context.subscriptions.push(
    vscode.window.onDidChangeActiveTextEditor((e) => { if (e) lastDocumentEditor = e; }),
    vscode.window.onDidChangeActiveNotebookEditor((e) => { if (e) lastNotebookEditor = e; }),
  );
}

/**
 * Inserts the result where the user was: in a notebook, a markdown cell and, below it, a cell whose outputs
 * are the plots as SVG images; in a markdown document, the markdown with a relative link to each plot, the
 * SVG files written into "<document>.plots/" beside it.
 */
export async function insertMarkdown(markdown: string, plots: readonly Plot[] = [], title = 'result'): Promise<string> {
  const notebook = vscode.window.activeNotebookEditor ?? lastNotebookEditor;
  const editor = vscode.window.activeTextEditor ?? lastDocumentEditor;
  if (notebook && (!editor || editor.document.uri.scheme === 'vscode-notebook-cell') && !notebook.notebook.isClosed) {
    const at = Math.min(notebook.notebook.cellCount, (notebook.selection?.end ?? notebook.notebook.cellCount));
    const cells = [new vscode.NotebookCellData(vscode.NotebookCellKind.Markup, markdown, 'markdown')];
    if (plots.length > 0) {
      const language = notebook.notebook.cellAt(Math.max(0, at - 1))?.document.languageId ?? 'python';
      const figure = new vscode.NotebookCellData(vscode.NotebookCellKind.Code, `# ${t('Plots of: {0}', title)}`, language === 'markdown' ? 'python' : language);
      figure.outputs = plots.map((plot, i) => new vscode.NotebookCellOutput([vscode.NotebookCellOutputItem.text(renderPlotSvg(plot, { idPrefix: `nb${Date.now()}-${i}` }), 'image/svg+xml')]));
      cells.push(figure);
    }
    const edit = new vscode.WorkspaceEdit();
    edit.set(notebook.notebook.uri, [vscode.NotebookEdit.insertCells(at, cells)]);
    await vscode.workspace.applyEdit(edit);
    return plots.length > 0 ? t('Inserted a markdown cell and a cell with {0} plot(s) below the selected cell.', plots.length) : t('Inserted a markdown cell below the selected cell.');
  }
  if (editor && !editor.document.isClosed && editor.document.languageId === 'markdown') {
    let text = markdown;
    if (plots.length > 0 && editor.document.uri.scheme === 'file') {
      const documentPath = editor.document.uri.fsPath;
      const folder = plotFolderName(documentPath);
      const links: { link: string; alt: string }[] = [];
      for (const [i, plot] of plots.entries()) {
        const name = plotFileName(title, i, plot);
        await vscode.workspace.fs.writeFile(vscode.Uri.file(path.join(path.dirname(documentPath), folder, name)), new TextEncoder().encode(renderPlotSvg(plot, { idPrefix: `cc${i + 1}` })));
        links.push({ link: `${folder}/${name}`, alt: plot.title });
      }
      text = withPlotLinks(markdown, links);
    }
    const position = editor.selection.active;
    const edit = new vscode.WorkspaceEdit();
    edit.insert(editor.document.uri, position, `\n${text}\n`);
    await vscode.workspace.applyEdit(edit);
    return t('Inserted into {0} at line {1}.', path.basename(editor.document.uri.fsPath), position.line + 1);
  }
  throw new Error(t('Open a markdown document or a notebook to insert into, then try again.'));
}

function defaultSpecPath(origin: PanelOrigin): string {
  if (origin.saved) return origin.specPath;
  const spec = origin.spec;
  const source = spec.source as { path?: string } | undefined;
  const base = source?.path ? path.basename(source.path).replace(/\.[^.]+$/, '') : 'result';
  return path.join(path.dirname(origin.specPath), `${base}.${String(spec.test)}.countercheck.json`);
}

/** Writes the spec with its recorded result. An existing file is only replaced after the user has seen the diff. */
export async function saveSpec(services: Services, origin: PanelOrigin, target?: vscode.Uri): Promise<vscode.Uri | undefined> {
  // The filter names the plain extension: a dialog that appends the filter's extension to a name whose
  // last extension differs would turn "x.countercheck.json" into "x.countercheck.json.countercheck.json".
  const chosen = target ?? (await vscode.window.showSaveDialog({ defaultUri: vscode.Uri.file(defaultSpecPath(origin)), filters: { [t('Countercheck test')]: ['json'] }, title: t('Save as test file') }));
  if (!chosen) return undefined;
  const uri = chosen.with({ path: specFileName(chosen.path) });
  const spec: Record<string, unknown> = { ...origin.spec };
  delete spec.recorded;
  const source = spec.source as Record<string, unknown> | undefined;
  if (source?.path && typeof source.path === 'string') {
    // Paths in a spec are relative to the spec file: re-base them on the new location.
    const abs = path.resolve(path.dirname(origin.specPath), source.path);
    spec.source = { ...source, path: path.relative(path.dirname(uri.fsPath), abs).split(path.sep).join('/') };
  }
  const s = settings(uri);
  const run = await runSpec(spec, { readers: extensionReaders, specPath: uri.fsPath, allowedRoot: services.workspaceRootFor(uri.fsPath), allowOutsideRoot: s.allowPathsOutsideWorkspace });
  const text = `${JSON.stringify({ $schema: undefined, ...spec, recorded: makeRecord(run, toolName(services.context), new Date()) }, null, 2)}\n`;
  let exists = false;
  try { await vscode.workspace.fs.stat(uri); exists = true; } catch { /* new file */ }
  if (exists) {
    const before = Buffer.from(await vscode.workspace.fs.readFile(uri)).toString('utf8');
    if (before === text) return uri;
    const proposed = await vscode.workspace.openTextDocument({ language: 'json', content: text });
    await vscode.commands.executeCommand('vscode.diff', uri, proposed.uri, t('{0} ↔ proposed', path.basename(uri.fsPath)), { preview: true });
    const replace = t('Replace');
    const choice = await vscode.window.showWarningMessage(t('{0} already exists. Replace it with the change shown?', path.basename(uri.fsPath)), { modal: true }, replace);
    if (choice !== replace) return undefined;
    const edit = new vscode.WorkspaceEdit();
    const doc = await vscode.workspace.openTextDocument(uri);
    edit.replace(uri, new vscode.Range(doc.positionAt(0), doc.positionAt(doc.getText().length)), text);
    await vscode.workspace.applyEdit(edit);
    await doc.save();
  } else {
    await vscode.workspace.fs.writeFile(uri, new TextEncoder().encode(text));
  }
  services.output.info(`saved ${uri.fsPath}`);
  return uri;
}

/** "Save plot…": the standalone SVG, or a PNG drawn by the panel's canvas when the name ends in .png. */
export async function savePlot(panel: ResultPanel, index: number, target?: vscode.Uri): Promise<void> {
  const plot = panel.payload.plots[index];
  if (!plot) return;
  const origin = panel.payload.origin;
  const folder = origin ? path.dirname(origin.specPath) : (vscode.workspace.workspaceFolders?.[0]?.uri.fsPath ?? '');
  const base = origin?.saved ? path.basename(origin.specPath) : panel.payload.title;
  const uri = target ?? await vscode.window.showSaveDialog({
    defaultUri: vscode.Uri.file(path.join(folder, plotFileName(base, index, plot))),
    filters: { [t('SVG image')]: ['svg'], [t('PNG image')]: ['png'] },
    title: t('Save plot'),
  });
  if (!uri) return;
  const svg = renderPlotSvg(plot);
  const bytes = /\.png$/i.test(uri.path) ? await panel.renderPng(svg, 2) : new TextEncoder().encode(svg);
  await vscode.workspace.fs.writeFile(uri, bytes);
  panel.post({ type: 'status', text: t('Saved {0}.', vscode.workspace.asRelativePath(uri)), level: 'info' });
}

/** "Copy table": tab-separated cells (a spreadsheet pastes them as cells). */
export async function copyTable(panel: ResultPanel, index: number): Promise<void> {
  const table = panel.payload.tables[index];
  if (!table) return;
  await vscode.env.clipboard.writeText(tableToTsv(table));
  panel.post({ type: 'status', text: t('Copied the table as tab-separated cells ({0} rows).', table.rows.length + 1), level: 'info' });
}

export async function handlePanelAction(services: Services, action: PanelAction, panel: ResultPanel): Promise<void> {
  const payload = panel.payload;
  switch (action) {
    case 'copy-text':
      await vscode.env.clipboard.writeText(payload.text);
      panel.post({ type: 'status', text: t('Copied the text summary.'), level: 'info' });
      return;
    case 'copy-markdown':
      await vscode.env.clipboard.writeText(payload.markdown);
      panel.post({ type: 'status', text: t('Copied the markdown.'), level: 'info' });
      return;
    case 'insert':
      try {
        panel.post({ type: 'status', text: await insertMarkdown(payload.markdown, payload.plots, payload.title), level: 'info' });
      } catch (e) {
        // Also as a notification: with no document open the panel is all the user sees.
        void vscode.window.showWarningMessage(t('Countercheck: {0}', errorMessage(e)));
        throw e;
      }
      return;
    case 'save-spec': {
      if (!payload.origin) return;
      const uri = await saveSpec(services, payload.origin);
      if (uri) {
        panel.update({ ...payload, origin: { ...payload.origin, specPath: uri.fsPath, saved: true } });
        panel.post({ type: 'status', text: t('Saved {0}.', vscode.workspace.asRelativePath(uri)), level: 'info' });
      }
      return;
    }
    case 'open-new':
      services.panels.openCopy(payload);
      return;
    case 'rerun': {
      if (!payload.origin) return;
      panel.post({ type: 'busy', busy: true });
      try {
        const run = await services.run(payload.origin.spec, payload.origin.specPath, payload.title);
        services.showResult(run.result, payload.origin, payload.title, payload.sourceDescription, panel);
      } finally {
        panel.post({ type: 'busy', busy: false });
      }
    }
  }
}
