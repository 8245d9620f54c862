/**
 * The questions the planner may ask, as an interface the host implements (QuickPicks and input boxes in the
 * editor, a fake in the unit tests). The planner never shows anything itself.
 */

export interface Choice<T> {
  readonly label: string;
  readonly description?: string;
  readonly detail?: string;
  readonly value: T;
}

export interface Questions {
  /** One of the choices; throws `Cancelled` when the user dismisses the question. */
  choose<T>(question: { readonly title: string; readonly placeholder: string; readonly choices: readonly Choice<T>[]; readonly remembered?: (value: T) => boolean }): Promise<T>;
  /** A line of text checked by `validate` (a message, or undefined when it is acceptable); throws `Cancelled` when dismissed. */
  enter(question: { readonly title: string; readonly prompt: string; readonly value?: string; readonly validate: (text: string) => string | undefined }): Promise<string>;
  /** A warning the user may accept (true) or stop at (false). */
  confirm(question: { readonly title: string; readonly message: string; readonly accept: string }): Promise<boolean>;
}

/** Thrown by a `Questions` implementation when the user dismisses a question. */
export class Cancelled extends Error {
  constructor(message = 'Cancelled') {
    super(message);
    this.name = 'Cancelled';
  }
}
