// "Test a database table or query…": pick a configured connection, a table or view from its
// catalogue (information_schema) or one of the connection's saved queries, a test, its columns
// (with their server types) and an optional filter; the engine counts, the panel shows the result.
import * as path from 'node:path';
import * as vscode from 'vscode';
import { isInputError, isInstance } from '../errors';
import { listColumns, listTables, resolveConnection, type ResolvedConnection, type SqlSource } from '../data/sql/index';
import { Cancelled, settings, type Services } from './services';
import { askPassword, configuredConnections, storedPassword, useSecretStorage } from './sqlSource';

const t = vscode.l10n.t;
export const RUN_ON_DATABASE = 'countercheck.runOnDatabase';

type TestKind = 'independence' | 'goodness-of-fit' | 'variance';

interface DatabaseAnswers {
  connection?: string;
  table?: string;
  query?: string;
  test?: TestKind;
  columns?: string[];
  where?: string;
  sigma0?: number;
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

const TESTS: { key: TestKind; label: () => string; detail: () => string; columns: number; numeric: boolean }[] = [
  { key: 'independence', label: () => t('Independence of two categorical columns'), detail: () => t('The server cross-tabulates them (GROUP BY); Pearson χ²'), columns: 2, numeric: false },
  { key: 'goodness-of-fit', label: () => t('Goodness of fit of one categorical column'), detail: () => t('The server counts its levels; equal proportions expected'), columns: 1, numeric: false },
  { key: 'variance', label: () => t('Variance of one numeric column'), detail: () => t('The server computes n, mean and variance; χ² test against σ0'), columns: 1, numeric: true },
];

export async function runOnDatabase(services: Services, given: DatabaseAnswers = {}): Promise<void> {
  try {
    const connections = configuredConnections();
    const names = Object.keys(connections);
    const remembered = services.context.workspaceState.get<DatabaseAnswers>('answers:database') ?? {};
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
    const answers: DatabaseAnswers = { ...given, connection: name };
    if (answers.table === undefined && answers.query === undefined) Object.assign(answers, await askSource(name, remembered));
    const sqlSource: SqlSource = { sql: { connection: name, ...(answers.table !== undefined ? { table: answers.table } : { query: answers.query as string }) } };
    const key =
      answers.test ??
      (await choose(TESTS.map((x) => ({ key: x.key, label: x.label(), detail: x.detail() })), t('Which test?'), t('What to test on {0}', answers.table ?? t('the query')), (i) => i.key === remembered.test)).key;
    const test = TESTS.find((x) => x.key === key)!;
    answers.test = test.key;
    if (!answers.columns) {
      const columns = await withPassword(name, (c, signal) => listColumns(c, sqlSource, signal), t('Countercheck: reading the columns'));
      const eligible = test.numeric ? columns.filter((c) => c.numeric) : columns;
      const chosen: string[] = [];
      for (let k = 0; k < test.columns; k++) {
        const which = test.columns === 2 ? (k === 0 ? t('the rows') : t('the columns')) : t('the column');
        const item = await choose(
          eligible.filter((c) => !chosen.includes(c.name)).map((c) => ({ label: c.name, description: c.type })),
          test.label(),
          t('Choose {0}', which),
          (i) => remembered.test === test.key && i.label === remembered.columns?.[k],
        );
        chosen.push(item.label);
      }
      answers.columns = chosen;
    }
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
    const options: Record<string, unknown> = { alpha: settings().alpha };
    if (test.key === 'variance') {
      if (answers.sigma0 === undefined) {
        const text = await vscode.window.showInputBox({
          title: t('Hypothesised standard deviation σ0'),
          prompt: t('σ0 in the units of "{0}"', answers.columns[0]),
          value: remembered.sigma0 !== undefined ? String(remembered.sigma0) : undefined,
          validateInput: (v) => (Number(v) > 0 && Number.isFinite(Number(v)) ? undefined : t('σ0 must be a number greater than 0')),
        });
        if (text === undefined) cancelled();
        answers.sigma0 = Number(text);
      }
      Object.assign(options, { sigma0: answers.sigma0, alternative: 'two-sided' });
    }
    await services.context.workspaceState.update('answers:database', answers);
    const spec = {
      version: 1,
      test: test.key,
      source: { sql: sqlSource.sql, columns: answers.columns, ...(answers.where ? { where: answers.where } : {}) },
      ...options,
    };
    const folder = vscode.workspace.workspaceFolders?.[0]?.uri.fsPath ?? process.cwd();
    const specPath = path.join(folder, 'untitled.countercheck.json');
    const label = `${name}: ${answers.table ?? t('query')}`;
    const run = await services.run(spec, specPath, label);
    services.showResult(run.result, { spec, specPath, saved: false }, `${test.label()} — ${label}`, run.data.description);
  } catch (e) {
    await services.reportError(e);
  }
}

/** The one line activate() calls: the command, and where passwords are kept. */
export function registerSqlCommands(context: vscode.ExtensionContext, services: Services): void {
  useSecretStorage(context.secrets);
  context.subscriptions.push(vscode.commands.registerCommand(RUN_ON_DATABASE, (answers?: DatabaseAnswers) => runOnDatabase(services, isInstance(answers, vscode.Uri) ? {} : answers ?? {})));
}
