// Wires commands, the panel serializer, CodeLenses, hovers and the Testing view. Nothing else lives here.
import * as vscode from 'vscode';
import type { PanelAction, PanelPayload } from '../protocol';
import { COMMANDS } from './commandIds';
import { distributionLookup, planWithoutData } from './commands/distributionLookup';
import { refreshBlocks } from './commands/reportBlocks';
import { runOnCellOutput } from './commands/runOnCellOutput';
import { runOnFile } from './commands/runOnFile';
import { runOnSelection } from './commands/runOnSelection';
import { openSpecResult, rerunAndCompare, runSavedSpec } from './commands/savedSpecs';
import { BlockCodeLensProvider, ResultTermHoverProvider, SpecCodeLensProvider, SpecHoverProvider } from './lenses';
import { PANEL_VIEW_TYPE } from './panel';
import { copyTable, handlePanelAction, savePlot, saveSpec, trackEditors } from './panelActions';
import { Services } from './services';
import { registerSqlCommands } from './sqlCommand';
import { registerTesting, type SavedTests } from './testing';
import { isInstance } from '../errors';
import type { Answers } from '../planner/plan';

/** What activate returns: used by the integration tests and by other extensions. */
export interface CountercheckApi {
  readonly activationMs: number;
  /** The payloads of the open result panels, most recent last. */
  panels(): readonly PanelPayload[];
  activePanel(): PanelPayload | undefined;
  /** Runs a panel action on the active panel as if its button were pressed. */
  panelAction(action: PanelAction): Promise<void>;
  readonly savedTests: SavedTests;
  /** The last error notification's content. */
  lastError(): { message: string; code?: string; file?: string; line?: number } | undefined;
  /** Saves the active panel's spec to `target` with its recorded result (the panel's "save" button without the dialog). */
  saveActive(target: vscode.Uri): Promise<vscode.Uri | undefined>;
  /** The active panel's "Save plot…" without the dialog: SVG, or PNG drawn by the webview when target ends in .png. */
  savePlotOfActive(index: number, target: vscode.Uri): Promise<void>;
  /** Cancels the runs in progress, as the progress notification's Cancel button does; returns how many. */
  cancelRunning(): number;
  /** Restores a panel from serialized state, as the workbench does after a reload. */
  restorePanel(panel: vscode.WebviewPanel, state: unknown): Promise<void>;
}

export function activate(context: vscode.ExtensionContext): CountercheckApi {
  const started = performance.now();
  const services: Services = new Services(context, { onAction: (action, panel) => handlePanelAction(services, action, panel), onSavePlot: (index, panel) => savePlot(panel, index), onCopyTable: (index, panel) => copyTable(panel, index) });
  context.subscriptions.push(services);
  trackEditors(context);
  const command = (id: string, run: (...args: never[]) => unknown) => context.subscriptions.push(vscode.commands.registerCommand(id, run as (...args: unknown[]) => unknown));

  // From the explorer the second argument is the list of selected files, not answers.
  const answersFrom = (value: unknown): Answers => (value && typeof value === 'object' && !Array.isArray(value) && !isInstance(value, vscode.Uri) ? (value as Answers) : {});
  command(COMMANDS.runOnFile, (uri?: vscode.Uri, answers?: object) => runOnFile(services, uri, answersFrom(answers)));
  command(COMMANDS.runOnSelection, (answers?: object) => runOnSelection(services, answersFrom(answers)));
  command(COMMANDS.runOnCellOutput, (cell?: vscode.NotebookCell, answers?: object) => runOnCellOutput(services, cell, answersFrom(answers)));
  command(COMMANDS.distributionLookup, (args?: { df?: number; x?: number; p?: number }) => distributionLookup(services, args));
  command(COMMANDS.planWithoutData, (answers?: object) => planWithoutData(services, answersFrom(answers)));
  command(COMMANDS.runSavedSpec, (uri?: vscode.Uri) => runSavedSpec(services, uri));
  command(COMMANDS.rerunAndCompare, (uri?: vscode.Uri) => rerunAndCompare(services, uri));
  command(COMMANDS.refreshAllBlocks, (uri?: vscode.Uri) => refreshBlocks(services, uri));
  command(COMMANDS.refreshBlock, (uri: vscode.Uri, index: number) => refreshBlocks(services, uri, index));
  command(COMMANDS.openSpecResult, (uri?: vscode.Uri) => {
    // From the palette there is no argument: the spec in the active editor.
    const target = isInstance(uri, vscode.Uri) ? uri : vscode.window.activeTextEditor?.document.uri;
    return target ? openSpecResult(services, target) : runSavedSpec(services);
  });
  // The Getting Started walkthrough's sample: the demo bakery log shipped in the extension.
  command(COMMANDS.openSampleData, () => vscode.window.showTextDocument(vscode.Uri.joinPath(context.extensionUri, 'media', 'walkthrough', 'bakery-defects.csv')));
  registerSqlCommands(context, services);

  context.subscriptions.push(
    vscode.window.registerWebviewPanelSerializer(PANEL_VIEW_TYPE, services.panels),
    vscode.languages.registerCodeLensProvider({ pattern: '**/*.countercheck.json' }, new SpecCodeLensProvider()),
    vscode.languages.registerHoverProvider({ pattern: '**/*.countercheck.json' }, new SpecHoverProvider()),
    vscode.languages.registerHoverProvider({ language: 'markdown' }, new ResultTermHoverProvider()),
    vscode.languages.registerCodeLensProvider({ language: 'markdown' }, new BlockCodeLensProvider()),
  );
  const savedTests = registerTesting(services);

  const activationMs = performance.now() - started;
  services.output.info(`activated in ${activationMs.toFixed(1)} ms`);
  return {
    activationMs,
    panels: () => services.panels.all.map((p) => p.payload),
    activePanel: () => services.panels.active?.payload,
    panelAction: async (action) => {
      const panel = services.panels.active;
      if (!panel) throw new Error('no result panel is open');
      await handlePanelAction(services, action, panel);
    },
    savedTests,
    lastError: () => services.lastError,
    savePlotOfActive: async (index, target) => {
      const panel = services.panels.active;
      if (!panel) throw new Error('no result panel is open');
      await savePlot(panel, index, target);
    },
    saveActive: async (target) => {
      const origin = services.panels.active?.payload.origin;
      if (!origin) throw new Error('the active panel has no spec to save');
      return saveSpec(services, origin, target);
    },
    cancelRunning: () => services.cancelRunning(),
    restorePanel: (panel, state) => services.panels.deserializeWebviewPanel(panel, state as never),
  };
}

export function deactivate(): void {}
