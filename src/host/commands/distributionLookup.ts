// "Look up the χ² distribution": first what is wanted (the probability for a statistic, or the critical
// value for α), then df, then the one number that question needs, so a number is never read as the other.
import * as path from 'node:path';
import * as vscode from 'vscode';
import type { Services } from '../services';
import { parseLookupNumber } from '../locations';

export interface LookupArgs {
  df?: number;
  x?: number;
  p?: number;
}

export async function distributionLookup(services: Services, args: LookupArgs = {}): Promise<void> {
  const t = vscode.l10n.t;
  try {
    let { df, x, p } = args;
    let want: 'probability' | 'critical' | undefined = x !== undefined ? 'probability' : p !== undefined ? 'critical' : undefined;
    if (want === undefined) {
      const probability = { label: t('Probability for a statistic'), detail: t('P(X > x) and P(X ≤ x) for a χ² value you have'), want: 'probability' as const };
      const critical = { label: t('Critical value for α'), detail: t('The χ² value with upper-tail probability α (and the lower and two-sided ones)'), want: 'critical' as const };
      const chosen = await vscode.window.showQuickPick([probability, critical], { title: t('χ² distribution'), placeHolder: t('What do you want to look up?') });
      if (!chosen) return;
      want = chosen.want;
    }
    if (df === undefined) {
      const text = await vscode.window.showInputBox({ title: t('χ² distribution'), prompt: t('Degrees of freedom (> 0)'), validateInput: (v) => (parseLookupNumber(v, 'df') === undefined ? t('Enter a number greater than 0') : undefined) });
      if (text === undefined) return;
      df = parseLookupNumber(text, 'df');
      if (df === undefined) return;
    }
    if (want === 'probability' && x === undefined) {
      const text = await vscode.window.showInputBox({ title: t('χ² distribution, df = {0}', df), prompt: t('The statistic x (≥ 0)'), validateInput: (v) => (parseLookupNumber(v, 'x') === undefined ? t('Enter a number x ≥ 0') : undefined) });
      if (text === undefined) return;
      x = parseLookupNumber(text, 'x');
      if (x === undefined) return;
    }
    if (want === 'critical' && p === undefined) {
      const text = await vscode.window.showInputBox({ title: t('χ² distribution, df = {0}', df), prompt: t('α, the tail probability (between 0 and 1)'), value: '0.05', validateInput: (v) => (parseLookupNumber(v, 'p') === undefined ? t('Enter α between 0 and 1, such as 0.05') : undefined) });
      if (text === undefined) return;
      p = parseLookupNumber(text, 'p');
      if (p === undefined) return;
    }
    const spec: Record<string, unknown> = { version: 1, test: 'distribution', df, ...(x !== undefined ? { x } : {}), ...(p !== undefined ? { p } : {}) };
    const root = vscode.workspace.workspaceFolders?.[0]?.uri.fsPath ?? process.cwd();
    const specPath = path.join(root, 'untitled.countercheck.json');
    const run = await services.run(spec, specPath, t('χ² distribution'));
    services.showResult(run.result, { spec, specPath, saved: false }, t('χ² distribution, df = {0}', df), t('distribution lookup'));
  } catch (e) {
    await services.reportError(e);
  }
}
