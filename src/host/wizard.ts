// The one wizard: whatever the entry point (file, selection, cell output, database, palette), the planner
// decides what fits and what to ask; this file only renders its questions as QuickPicks and input boxes,
// remembers the answers per source, and hands the planned spec to the runner and the panel.
import * as path from 'node:path';
import * as vscode from 'vscode';
import type { Offer } from '../planner/offer';
import { plan, type Answers } from '../planner/plan';
import { Cancelled, type Choice, type Questions, type Shown } from '../planner/questions';
import { settings, type Services } from './services';

const t = vscode.l10n.t;

/**
 * The planner's words in the user's language: its templates (literal `text('…')` calls in src/planner and the strings
 * of the procedures' field tables) are listed in l10n/bundle.l10n.json by test/unit/host/l10n.test.ts, which knows
 * this one call with a message that is not a literal; words from the data are shown as they are.
 */
export function shown(s: Shown): string {
  if ('verbatim' in s) return s.verbatim;
  return vscode.l10n.t(s.message, ...s.args.map((a) => (typeof a === 'object' ? shown(a) : a)));
}
const shownOrNone = (s: Shown | undefined): string | undefined => (s === undefined ? undefined : shown(s));

export const quickPickQuestions: Questions = {
  async choose<T>(q: { title: Shown; placeholder: Shown; choices: readonly Choice<T>[]; remembered?: (value: T) => boolean }): Promise<T> {
    type Item = vscode.QuickPickItem & { value: T };
    const qp = vscode.window.createQuickPick<Item>();
    qp.title = shown(q.title);
    qp.placeholder = shown(q.placeholder);
    qp.items = q.choices.map((c) => ({ label: shown(c.label), description: shownOrNone(c.description), detail: shownOrNone(c.detail), value: c.value }));
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
    const text = await vscode.window.showInputBox({ title: shown(q.title), prompt: shown(q.prompt), value: q.value, validateInput: (v) => shownOrNone(q.validate(v)), ignoreFocusOut: true });
    if (text === undefined) throw new Cancelled(t('Cancelled'));
    return text;
  },
  async confirm(q) {
    const accept = shown(q.accept);
    const choice = await vscode.window.showWarningMessage(t('{0}: {1}', shown(q.title), shown(q.message)), { modal: true }, accept);
    return choice === accept;
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
    for (const note of planned.notes.map(shown)) {
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
