/**
 * The questions the planner may ask, as an interface the host implements (QuickPicks and input boxes in the
 * editor, a fake in the unit tests). The planner never shows anything itself, and it writes no finished sentence
 * for the user: every word it shows is a `Text`, an English template with `{0}`, `{1}`… that the host translates
 * (`vscode.l10n.t`, listed in l10n/bundle.l10n.json), or `Verbatim` text from the data, shown as it is.
 */

/** A template and its arguments; an argument may itself be shown text (a procedure's label inside a sentence). */
export interface Text {
  readonly message: string;
  readonly args: readonly (string | number | Shown)[];
}

/** Words from the data or from elsewhere that are not translated: a column name, a level, a server type. */
export interface Verbatim {
  readonly verbatim: string;
}

export type Shown = Text | Verbatim;

/**
 * Words the planner writes. The message must be a string literal: test/unit/host/l10n.test.ts collects the
 * `text('…')` calls of src/planner into the translation bundle, and fails when one is missing from it.
 */
export const text = (message: string, ...args: (string | number | Shown)[]): Text => ({ message, args });

/**
 * A string of a procedure's field table (src/savedtest/procedures/*): its planning label and detail, a question's
 * title, a choice label, a field's description. The l10n test lists every such string in the bundle from the tables.
 */
export const tableText = (message: string): Text => ({ message, args: [] });

export const verbatim = (s: string): Verbatim => ({ verbatim: s });

/** Items separated by commas, with "…" when there are more: a template of placeholders only (nothing to translate). */
export function listOf(items: readonly (string | number | Shown)[], more = false): Text {
  return { message: items.map((_, i) => `{${i}}`).join(', ') + (more ? ', …' : ''), args: items };
}

/** Fills a template as `vscode.l10n.t` does: `{0}`, `{1}`… by position. */
export function fill(message: string, args: readonly string[]): string {
  return message.replace(/\{(\d+)\}/g, (whole, k: string) => args[Number(k)] ?? whole);
}

/** The English words, for the command line, logs, error messages and tests. */
export function english(shown: Shown): string {
  if ('verbatim' in shown) return shown.verbatim;
  return fill(shown.message, shown.args.map((a) => (typeof a === 'object' ? english(a) : String(a))));
}

export interface Choice<T> {
  readonly label: Shown;
  readonly description?: Shown;
  readonly detail?: Shown;
  readonly value: T;
}

export interface Questions {
  /** One of the choices; throws `Cancelled` when the user dismisses the question. */
  choose<T>(question: { readonly title: Shown; readonly placeholder: Shown; readonly choices: readonly Choice<T>[]; readonly remembered?: (value: T) => boolean }): Promise<T>;
  /** A line of text checked by `validate` (a message, or undefined when it is acceptable); throws `Cancelled` when dismissed. */
  enter(question: { readonly title: Shown; readonly prompt: Shown; readonly value?: string; readonly validate: (text: string) => Shown | undefined }): Promise<string>;
  /** A warning the user may accept (true) or stop at (false). */
  confirm(question: { readonly title: Shown; readonly message: Shown; readonly accept: Shown }): Promise<boolean>;
}

/** Thrown by a `Questions` implementation when the user dismisses a question. */
export class Cancelled extends Error {
  constructor(message = 'Cancelled') {
    super(message);
    this.name = 'Cancelled';
  }
}
