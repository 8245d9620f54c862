// The panel's payload with the editor's translations: the builder itself is pure (src/report/panel.ts),
// so the command line, the tests and the benchmark build exactly what the panel shows.
import * as vscode from 'vscode';
import type { PanelPayload } from '../protocol';
import { buildPanelPayload, type PayloadOptions } from '../report/panel';
import type { Result } from '../stats/result';

export type { PayloadOptions };

export function buildPayload(result: Result, options: PayloadOptions): PanelPayload {
  return buildPanelPayload(result, options, vscode.l10n.t);
}
