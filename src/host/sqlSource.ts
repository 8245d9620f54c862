// The SQL reader as the extension runs it: connections from the `countercheck.connections` setting
// (ignored from workspace settings in an untrusted workspace, see package.json capabilities),
// passwords from VS Code's secret storage (asked once when the server refuses), and the trust
// gate: in an untrusted workspace a SQL source shows the statements it would run and asks first.
import * as vscode from 'vscode';
import { InputError, isInputError } from '../errors';
import {
  describeConnection,
  previewSql,
  resolveConnection,
  sqlSpecReader,
  type ConnectionSettings,
  type SqlSpecSource,
} from '../data/sql/index';
import type { SpecReaders } from '../savedtest/types';

const t = vscode.l10n.t;

let secrets: vscode.SecretStorage | undefined;

/** Called once at activation: where passwords live. */
export function useSecretStorage(storage: vscode.SecretStorage): void {
  secrets = storage;
}

export function configuredConnections(): Readonly<Record<string, ConnectionSettings>> {
  return vscode.workspace.getConfiguration('countercheck').get<Record<string, ConnectionSettings>>('connections') ?? {};
}

function secretKey(connection: string): string {
  return `countercheck.connection.${connection}.password`;
}

export async function storedPassword(connection: string): Promise<string | undefined> {
  return secrets?.get(secretKey(connection));
}

/** Asks for a connection's password and keeps it in secret storage; undefined when dismissed. */
export async function askPassword(connection: string, why: string): Promise<string | undefined> {
  const resolved = resolveConnection(connection, configuredConnections(), process.env);
  const password = await vscode.window.showInputBox({
    title: t('Password for connection {0}', describeConnection(resolved)),
    prompt: why,
    password: true,
    ignoreFocusOut: true,
  });
  if (password === undefined) return undefined;
  await secrets?.store(secretKey(connection), password);
  return password;
}

/** In an untrusted workspace: show what would run and ask. Throws when the user declines. */
async function confirmUntrusted(source: SqlSpecSource, request: Parameters<NonNullable<SpecReaders['aggregateSql']>>[1], intake: Parameters<NonNullable<SpecReaders['aggregateSql']>>[2]): Promise<void> {
  if (vscode.workspace.isTrusted || !source.sql) return;
  const statements = previewSql({ sql: source.sql, where: source.where, parameters: source.parameters }, request, { missing: intake.missing, categories: intake.categories, keepValues: intake.keepValues });
  const run = t('Run on "{0}"', source.sql.connection);
  const choice = await vscode.window.showWarningMessage(
    t('This workspace is not trusted. A saved test wants to run SQL on your connection "{0}".', source.sql.connection),
    { modal: true, detail: statements },
    run,
  );
  if (choice !== run) {
    throw new InputError(t('the SQL source was not run: the workspace is not trusted and the query was not approved'), { jsonPath: '$.source.sql' }, 'sql-untrusted');
  }
}

/** `readers.aggregateSql` for runSpec in the extension. */
export const hostAggregateSql: NonNullable<SpecReaders['aggregateSql']> = async (specSource, request, intake, control) => {
  const source: SqlSpecSource = specSource;
  await confirmUntrusted(source, request, intake);
  const read = sqlSpecReader({ connections: configuredConnections(), env: process.env, password: storedPassword });
  try {
    return await read(source, request, intake, control);
  } catch (e) {
    // The server refused the password (or none was known): ask once, keep it, try again.
    if (!isInputError(e) || e.code !== 'sql-auth' || !source.sql) throw e;
    const password = await askPassword(source.sql.connection, e.message);
    if (password === undefined) throw e;
    return sqlSpecReader({ connections: configuredConnections(), env: process.env, password: async () => password })(source, request, intake, control);
  }
};
