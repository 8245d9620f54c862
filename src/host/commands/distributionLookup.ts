// Palette entries that need no data: the chi-square distribution lookup, and power or sample size.
// Both go through the one wizard with nothing offered; the planner asks for what the procedure needs.
import * as vscode from 'vscode';
import type { Answers } from '../../planner/plan';
import type { Services } from '../services';
import { runWizard } from '../wizard';

export interface LookupArgs {
  df?: number;
  x?: number;
  p?: number;
}

function paletteTarget(services: Services, label: string) {
  const root = vscode.workspace.workspaceFolders?.[0]?.uri.fsPath ?? process.cwd();
  return { key: `palette:${label}`, specFolder: services.workspaceRootFor(root), label };
}

export async function distributionLookup(services: Services, args: LookupArgs = {}): Promise<void> {
  const given: Answers = { test: 'distribution', ...Object.fromEntries(Object.entries(args).filter(([, v]) => v !== undefined)) };
  await runWizard(services, { kind: 'nothing', description: vscode.l10n.t('distribution lookup') }, given, paletteTarget(services, vscode.l10n.t('χ² distribution')));
}

/** "Power, Sample Size or Chi-Square Lookup…": the procedures that need no data. */
export async function planWithoutData(services: Services, given: Answers = {}): Promise<void> {
  await runWizard(services, { kind: 'nothing', description: vscode.l10n.t('no data') }, given, paletteTarget(services, vscode.l10n.t('planning')));
}
