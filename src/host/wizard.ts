// The one wizard: whatever the entry point (file, selection, cell output, database, palette), the planner
// decides what fits and what to ask; this file only renders its questions as QuickPicks and input boxes,
// remembers the answers per source, and hands the planned spec to the runner and the panel.
import * as path from 'node:path';
import * as vscode from 'vscode';
import type { Offer } from '../planner/offer';
import { plan, type Answers } from '../planner/plan';
import { Cancelled, type Choice, type Questions } from '../planner/questions';
import { settings, type Services } from './services';

const t = vscode.l10n.t;

export const quickPickQuestions: Questions = {
  async choose<T>(q: { title: string; placeholder: string; choices: readonly Choice<T>[]; remembered?: (value: T) => boolean }): Promise<T> {
    type Item = vscode.QuickPickItem & { value: T };
    const qp = vscode.window.createQuickPick<Item>();
    qp.title = q.title;
    qp.placeholder = q.placeholder;
    qp.items = q.choices.map((c) => ({ label: c.label, description: c.description, detail: c.detail, value: c.value }));
    qp.matchOnDetail = true;
    qp.ignoreFocusOut = true;
    const active = q.remembered ? qp.items.find((i) => q.remembered!(i.value)) : undefined;
    if (active) qp.activeItems = [active];
    const chosen = await new Promise<Item | undefined>((resolve) => {
      qp.onDidAccept(() => {
        resolve(qp.selectedItems[0] ?? qp.activeItems[0]);
        qp.hide();
      });
      qp.onDidHide(() => resolve(undefined));
      qp.show();
    });
    qp.dispose();
    if (!chosen) throw new Cancelled(t('Cancelled'));
    return chosen.value;
  },
  async enter(q) {
    const text = await vscode.window.showInputBox({ title: q.title, prompt: q.prompt, value: q.value, validateInput: q.validate, ignoreFocusOut: true });
    if (text === undefined) throw new Cancelled(t('Cancelled'));
    return text;
  },
  async confirm(q) {
    const choice = await vscode.window.showWarningMessage(`${q.title}: ${q.message}`, { modal: true }, q.accept);
    return choice === q.accept;
  },
};

export interface WizardTarget {
  /** Key under which the answers are remembered (a file path, a selection's description, "database"). */
  readonly key: string;
  /** Folder the untitled spec belongs to (a file's folder, or the workspace folder). */
  readonly specFolder: string;
  /** Short name for the progress notification and the panel's title. */
  readonly label: string;
  readonly documentUri?: string;
}

/** Plans with the user, runs the spec, shows the panel. Errors (and a cancel) are reported, never thrown. */
export async function runWizard(services: Services, offer: Offer, given: Answers, target: WizardTarget): Promise<void> {
  try {
    const s = settings();
    const storeKey = `answers:${target.key}`;
    const remembered = services.context.workspaceState.get<Answers>(storeKey) ?? {};
    const planned = await plan({ offer, questions: quickPickQuestions, settings: s, given, remembered, specFolder: target.specFolder });
    await services.context.workspaceState.update(storeKey, planned.answers);
    for (const note of planned.notes) {
      services.output.info(`${target.label}: ${note}`);
      // What was inferred from the data (a weight column, an already-counted table) is said where the user looks.
      void vscode.window.showInformationMessage(t('Countercheck: {0}', note));
    }
    const specPath = path.join(target.specFolder, 'untitled.countercheck.json');
    const run = await services.run(planned.spec, specPath, target.label);
    const title = `${planned.title.split(' — ')[0]} — ${path.basename(target.label)}`;
    services.showResult(run.result, { spec: planned.spec, specPath, saved: false, documentUri: target.documentUri }, title, run.data.description === 'inline' ? target.label : run.data.description);
  } catch (e) {
    await services.reportError(e);
  }
}
