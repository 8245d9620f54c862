// "Test a database table or query…": pick a configured connection, a table or view from its
// catalogue (information_schema) or one of the connection's saved queries, and an optional filter;
// the columns and their server types go to the one wizard, which plans the test; the engine counts.
import * as vscode from 'vscode';
import { isInputError, isInstance } from '../errors';
import { listColumns, listTables, resolveConnection, type ResolvedConnection, type SqlSource } from '../data/sql/index';
import type { Offer } from '../planner/offer';
import type { Answers } from '../planner/plan';
import { Cancelled, type Services } from './services';
import { runWizard } from './wizard';
import { askPassword, configuredConnections, storedPassword, useSecretStorage } from './sqlSource';

const t = vscode.l10n.t;
export const RUN_ON_DATABASE = 'countercheck.runOnDatabase';

/** Where the data is (asked here), then any answer the planner would otherwise ask (test, columns, sigma0…). */
interface DatabaseAnswers extends Answers {
  connection?: string;
  table?: string;
  query?: string;
  where?: string;
}

function cancelled(): never {
  throw new Cancelled(t('Cancelled'));
}

async function choose<T extends vscode.QuickPickItem>(items: T[], title: string, placeHolder: string, remembered?: (item: T) => boolean): Promise<T> {
  const sorted = remembered ? [...items.filter(remembered), ...items.filter((i) => !remembered(i))] : items;
  return (await vscode.window.showQuickPick(sorted, { title, placeHolder, matchOnDescription: true, matchOnDetail: true, ignoreFocusOut: true })) ?? cancelled();
}

/** Runs `work` against the connection, asking for the password once if the server refuses. */
async function withPassword<T>(name: string, work: (c: ResolvedConnection, signal: AbortSignal) => Promise<T>, title: string): Promise<T> {
  const attempt = (password: string | undefined) =>
    vscode.window.withProgress({ location: vscode.ProgressLocation.Notification, title, cancellable: true }, async (_p, token) => {
      const abort = new AbortController();
      const sub = token.onCancellationRequested(() => abort.abort());
      try {
        return await work(resolveConnection(name, configuredConnections(), process.env, password), abort.signal);
      } finally {
        sub.dispose();
      }
    });
  try {
    return await attempt(await storedPassword(name));
  } catch (e) {
    if (!isInputError(e) || e.code !== 'sql-auth') throw e;
    const password = await askPassword(name, e.message);
    if (password === undefined) cancelled();
    return attempt(password);
  }
}

async function askSource(name: string, remembered: DatabaseAnswers): Promise<{ table?: string; query?: string }> {
  const saved = Object.entries(configuredConnections()[name]?.queries ?? {});
  const tables = await withPassword(name, (c, signal) => listTables(c, signal), t('Countercheck: reading the catalogue of "{0}"', name));
  type Item = vscode.QuickPickItem & { table?: string; query?: string };
  const items: Item[] = [
    ...(saved.length ? [{ label: t('Saved queries'), kind: vscode.QuickPickItemKind.Separator } as Item] : []),
    ...saved.map(([label, query]) => ({ label, description: t('saved query'), detail: query.replace(/\s+/g, ' ').slice(0, 120), query })),
    { label: t('Tables and views'), kind: vscode.QuickPickItemKind.Separator },
    ...tables.map((tb) => {
      const qualified = `${/[."]/.test(tb.schema) ? `"${tb.schema.replace(/"/g, '""')}"` : tb.schema}.${/[."]/.test(tb.name) ? `"${tb.name.replace(/"/g, '""')}"` : tb.name}`;
      return { label: qualified, description: tb.type === 'VIEW' ? t('view') : t('table'), table: qualified };
    }),
  ];
  const item = await choose(items, t('Source on "{0}"', name), t('A table, a view or a saved query'), (i) => (i.table !== undefined && i.table === remembered.table) || (i.query !== undefined && i.query === remembered.query));
  return item.table !== undefined ? { table: item.table } : { query: item.query };
}

export async function runOnDatabase(services: Services, given: DatabaseAnswers = {}): Promise<void> {
  let offer: Offer;
  let answers: DatabaseAnswers;
  try {
    const connections = configuredConnections();
    const names = Object.keys(connections);
    const remembered = services.context.workspaceState.get<DatabaseAnswers>('answers:database-source') ?? {};
    let name = given.connection;
    if (!name) {
      if (names.length === 0) {
        const open = t('Open Settings');
        const choice = await vscode.window.showInformationMessage(t('Countercheck: no database connection is configured. Add one under countercheck.connections (host, port, database, user, sslmode); the password is asked for and kept in secret storage.'), open);
        if (choice === open) await vscode.commands.executeCommand('workbench.action.openSettings', 'countercheck.connections');
        return;
      }
      name = names.length === 1 ? names[0] : (await choose(names.map((n) => ({ label: n, description: connections[n].host ?? '' })), t('Database connection'), t('Which connection?'), (i) => i.label === remembered.connection)).label;
    }
    answers = { ...given, connection: name };
    if (answers.table === undefined && answers.query === undefined) Object.assign(answers, await askSource(name, remembered));
    const sqlSource: SqlSource = { sql: { connection: name, ...(answers.table !== undefined ? { table: answers.table } : { query: answers.query as string }) } };
    const columns = await withPassword(name, (c, signal) => listColumns(c, sqlSource, signal), t('Countercheck: reading the columns'));
    if (answers.where === undefined) {
      const where = await vscode.window.showInputBox({
        title: t('Filter (optional)'),
        prompt: t('A SQL condition on the source, e.g. shift = \'night\' AND weight_g > 0. Leave empty to use every row. It runs inside a read-only transaction.'),
        value: remembered.table === answers.table ? remembered.where : undefined,
        ignoreFocusOut: true,
      });
      if (where === undefined) cancelled();
      answers.where = where.trim() === '' ? undefined : where.trim();
    }
    await services.context.workspaceState.update('answers:database-source', { connection: answers.connection, table: answers.table, query: answers.query, where: answers.where });
    offer = { kind: 'catalogue', sql: sqlSource.sql, columns, description: `${name}: ${answers.table ?? t('query')}` };
  } catch (e) {
    await services.reportError(e);
    return;
  }
  const planAnswers: Answers = Object.fromEntries(Object.entries(answers).filter(([k]) => !['connection', 'table', 'query'].includes(k)));
  const folder = vscode.workspace.workspaceFolders?.[0]?.uri.fsPath ?? process.cwd();
  await runWizard(services, offer, planAnswers, { key: `database:${offer.description}`, specFolder: folder, label: offer.description });
}

/** The one line activate() calls: the command, and where passwords are kept. */
export function registerSqlCommands(context: vscode.ExtensionContext, services: Services): void {
  useSecretStorage(context.secrets);
  context.subscriptions.push(vscode.commands.registerCommand(RUN_ON_DATABASE, (answers?: DatabaseAnswers) => runOnDatabase(services, isInstance(answers, vscode.Uri) ? {} : answers ?? {})));
}
