// What every command shares: settings, the output channel, the spec runner with the extension's file
// readers, the panels, and the error notification that points at the place in the file.
import type { FamilyMembership } from '../report/evidence';
import * as path from 'node:path';
import * as vscode from 'vscode';
import { rememberSpecFolder, resolveErrorFile, sourceKey, specFolderOf } from './locations';
import { aggregateFile } from '../data/file';
import { detectDialect } from '../data/dialect';
import { errorMessage, isInputError, isInstance, type InputError } from '../errors';
import { Cancelled } from '../planner/questions';
import type { PanelOrigin } from '../protocol';
import { runSpec } from '../savedtest/run';
import type { SpecReaders, SpecRun } from '../savedtest/types';
import type { Result } from '../stats/result';
import { PanelManager, type PanelActions, type ResultPanel } from './panel';
import { buildPayload } from './payload';
import { categoryOrderText } from '../report/panel';
import { hostAggregateSql } from './sqlSource';

const t = vscode.l10n.t;

export interface Settings {
  readonly alpha: number;
  readonly decimals: number;
  readonly correction: boolean;
  readonly missingValues: readonly string[];
  readonly monteCarloResamples: number;
  readonly allowPathsOutsideWorkspace: boolean;
  readonly keepSeveralPanels: boolean;
  /** Review flags a recorded significant conclusion whose fragility index is at most this. */
  readonly fragilityThreshold: number;
}

export function settings(scope?: vscode.Uri): Settings {
  const c = vscode.workspace.getConfiguration('countercheck', scope);
  return {
    alpha: c.get<number>('alpha', 0.05),
    decimals: c.get<number>('decimals', 2),
    correction: c.get<boolean>('correction', false),
    missingValues: c.get<string[]>('missingValues', ['', 'NA', 'NaN', 'null', '-']),
    monteCarloResamples: c.get<number>('monteCarloResamples', 10000),
    allowPathsOutsideWorkspace: c.get<boolean>('allowPathsOutsideWorkspace', false),
    keepSeveralPanels: c.get<boolean>('keepSeveralPanels', false),
    fragilityThreshold: c.get<number>('fragilityThreshold', 2),
  };
}

export const extensionReaders: SpecReaders = {
  aggregateFile: (file, request, options, control) =>
    aggregateFile(file, request, options, {
      signal: control.signal,
      onProgress: (p) => { if (p.totalBytes) control.onProgress?.(p.bytesRead / p.totalBytes); },
    }),
  aggregateSql: hostAggregateSql,
};

export { Cancelled } from '../planner/questions';

export class Services {
  readonly output = vscode.window.createOutputChannel('Countercheck', { log: true });
  readonly panels: PanelManager;
  private counter = 0;
  /** The last error shown to the user (for diagnostics and tests). */
  lastError: { message: string; code?: string; file?: string; line?: number } | undefined;
  /** Aborts the runs in progress: what the notification's Cancel button does. */
  private readonly running = new Set<AbortController>();
  cancelRunning(): number {
    for (const a of this.running) a.abort();
    return this.running.size;
  }

  constructor(
    readonly context: vscode.ExtensionContext,
    actions: PanelActions,
  ) {
    this.panels = new PanelManager(context.extensionUri, actions);
  }

  workspaceRootFor(file: string): string {
    const folder = vscode.workspace.getWorkspaceFolder(vscode.Uri.file(file)) ?? vscode.workspace.workspaceFolders?.[0];
    return folder?.uri.fsPath ?? path.dirname(file);
  }

  /** Runs a spec with a progress notification whose Cancel aborts the read. */
  async run(spec: Readonly<Record<string, unknown>>, specPath: string, label: string): Promise<SpecRun> {
    const s = settings(vscode.Uri.file(specPath));
    const started = Date.now();
    const outcome = await vscode.window.withProgress(
      { location: vscode.ProgressLocation.Notification, title: t('Countercheck: {0}', label), cancellable: true },
      async (progress, token) => {
        const abort = new AbortController();
        this.running.add(abort);
        const sub = token.onCancellationRequested(() => abort.abort());
        let reported = 0;
        try {
          return await runSpec(spec, {
            readers: extensionReaders,
            specPath,
            allowedRoot: this.workspaceRootFor(specPath),
            allowOutsideRoot: s.allowPathsOutsideWorkspace,
            signal: abort.signal,
            // What the panel shows is worded in the editor's language; recorded and compared runs stay English.
            translate: vscode.l10n.t,
            onProgress: (fraction) => {
              const pct = Math.floor(fraction * 100);
              if (pct > reported) {
                progress.report({ increment: pct - reported, message: `${pct} %` });
                reported = pct;
              }
            },
          });
        } catch (e) {
          if (abort.signal.aborted) throw new Cancelled(t('Cancelled'));
          rememberSpecFolder(e, specPath);
          throw e;
        } finally {
          sub.dispose();
          this.running.delete(abort);
        }
      },
    );
    this.output.info(`${label}: ${outcome.result.kind === 'test' ? outcome.result.procedure : outcome.result.kind} in ${Date.now() - started} ms (${outcome.data.description}, ${outcome.data.rows} rows)`);
    return outcome;
  }

  showResult(result: Result, origin: PanelOrigin | undefined, title: string, sourceDescription: string, reuse?: ResultPanel, membership?: FamilyMembership): ResultPanel {
    const s = settings(origin ? vscode.Uri.file(origin.specPath) : undefined);
    const payload = buildPayload(result, {
      id: `r${++this.counter}`,
      title,
      sourceDescription,
      decimals: s.decimals,
      canSave: origin !== undefined,
      canRerun: origin !== undefined,
      ...(membership ? { membership } : {}),
    });
    // One panel per source: a new run replaces the result of the same source unless panels are kept.
    const same = reuse ?? (s.keepSeveralPanels ? undefined : this.panels.forSource(sourceKey({ ...payload, origin })));
    const order = origin && (payload.tables.length > 0) ? categoryOrderText(origin.spec, t) : undefined;
    return this.panels.show({ ...payload, origin, ...(order ? { categoryOrder: order } : {}) }, same);
  }

  /** Shows any failure as a notification; an InputError gets a button that opens its file at the line. Never rethrows. */
  async reportError(e: unknown, baseFolder?: string): Promise<void> {
    if (isInstance(e, Cancelled)) {
      this.output.info('cancelled by the user');
      return;
    }
    const message = errorMessage(e);
    this.lastError = isInputError(e) ? { message, code: e.code, file: e.location.file, line: e.location.line } : { message };
    this.output.error(message);
    if (isInstance(e, Error) && e.stack && !isInputError(e)) this.output.debug(e.stack);
    if (!isInputError(e)) {
      void vscode.window.showErrorMessage(t('Countercheck: {0}', message));
      return;
    }
    const target = locate(e, baseFolder ?? specFolderOf(e));
    const where = target ? ` (${vscode.workspace.asRelativePath(target.uri)}${target.line ? `:${target.line}` : ''}${target.column ? `, ${t('column')} ${target.column}` : ''})` : '';
    const open = t('Open at location');
    // Not awaited: the command finishes now; the button works whenever the user gets to it.
    void vscode.window.showErrorMessage(t('Countercheck: {0}', message) + where, ...(target ? [open] : [])).then(async (choice) => {
      if (choice !== open || !target) return;
      const doc = await vscode.workspace.openTextDocument(target.uri);
      const line = Math.max(0, Math.min(doc.lineCount - 1, (target.line ?? 1) - 1));
      const col = columnOffset(doc, target.column, line);
      await vscode.window.showTextDocument(doc, { selection: new vscode.Range(line, col, line, col) });
    });
  }

  dispose(): void {
    this.panels.dispose();
    this.output.dispose();
  }
}

/** Where an InputError points: file (relative to the spec's folder or absolute), 1-based line, column name. */
/** Character offset of a named column on a line of a delimited file (0 when it cannot be found). */
function columnOffset(doc: vscode.TextDocument, column: string | undefined, line: number): number {
  if (!column) return 0;
  const header = doc.lineAt(0).text;
  const delimiter = detectDialect(doc.getText(new vscode.Range(0, 0, Math.min(doc.lineCount, 50), 0)), {}, true).delimiter;
  const index = header.split(delimiter).map((c) => c.trim().replace(/^"|"$/g, '')).indexOf(column);
  if (index <= 0) return 0;
  const text = doc.lineAt(line).text;
  let offset = 0;
  for (let k = 0; k < index; k++) {
    const next = text.indexOf(delimiter, offset);
    if (next < 0) return 0;
    offset = next + 1;
  }
  return offset;
}

export function locate(e: InputError, baseFolder?: string): { uri: vscode.Uri; line?: number; column?: string } | undefined {
  const { file, line, column } = e.location;
  if (!file) return undefined;
  const abs = resolveErrorFile(file, baseFolder, vscode.workspace.workspaceFolders?.[0]?.uri.fsPath);
  return { uri: vscode.Uri.file(abs), line, column };
}
