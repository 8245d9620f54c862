/**
 * The translator every wording function takes: `t(message, ...args)` with `{0}`, `{1}` … placeholders, the
 * convention of `vscode.l10n.t`. The editor passes `vscode.l10n.t`; the command line, saved tests and living
 * reports use `english`, so what they record reproduces anywhere.
 */
export type Translate = (message: string, ...args: (string | number | boolean)[]) => string;

/** The English message with its placeholders filled in. */
export const english: Translate = (message, ...args) => message.replace(/\{(\d+)\}/g, (whole, index: string) => (Number(index) < args.length ? String(args[Number(index)]) : whole));
