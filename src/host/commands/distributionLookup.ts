// "Look up the χ² distribution": p-value for a statistic, or the critical value for α, with df.
import * as path from 'node:path';
import * as vscode from 'vscode';
import type { Services } from '../services';

export interface LookupArgs {
  df?: number;
  x?: number;
  p?: number;
}

export async function distributionLookup(services: Services, args: LookupArgs = {}): Promise<void> {
  const t = vscode.l10n.t;
  try {
    let { df, x, p } = args;
    if (df === undefined) {
      const text = await vscode.window.showInputBox({ title: t('χ² distribution'), prompt: t('Degrees of freedom (> 0)'), validateInput: (v) => (Number(v) > 0 ? undefined : t('Enter a number greater than 0')) });
      if (text === undefined) return;
      df = Number(text);
    }
    if (x === undefined && p === undefined) {
      const text = await vscode.window.showInputBox({
        title: t('χ² distribution, df = {0}', df),
        prompt: t('A statistic (for its tail probabilities), or "p=0.05" (for critical values)'),
        validateInput: (v) => (/^\s*p\s*=\s*(0?\.\d+|1)\s*$/i.test(v) || Number(v) >= 0 ? undefined : t('Enter x ≥ 0, or p=0.05')),
      });
      if (text === undefined) return;
      const m = /^\s*p\s*=\s*(.+)$/i.exec(text);
      if (m) p = Number(m[1]); else x = Number(text);
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
