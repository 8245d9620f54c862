/**
 * Named connections: settings (`countercheck.connections`) or a connection string in an
 * environment variable, completed by the standard PostgreSQL variables (PGHOST, PGPORT, PGDATABASE,
 * PGUSER, PGPASSWORD, PGSSLMODE). A password never comes from a spec or a settings file: it comes
 * from the host's secret storage (passed in), PGPASSWORD, a connection string held in the
 * environment, or the user's ~/.pgpass (read by the client). Pure: plain objects in and out.
 */
import { InputError } from '../../errors';

export type TlsMode = 'disable' | 'require' | 'verify-ca' | 'verify-full';
export const tlsModes: readonly TlsMode[] = ['disable', 'require', 'verify-ca', 'verify-full'];

/** One entry of the `countercheck.connections` setting. */
export interface ConnectionSettings {
  readonly host?: string;
  readonly port?: number;
  readonly database?: string;
  readonly user?: string;
  /** TLS mode, as PostgreSQL's sslmode. Default: "disable" for localhost and sockets, "verify-full" otherwise. */
  readonly sslmode?: TlsMode;
  /** File with the certificate authority for verify-ca / verify-full (default: the system's). */
  readonly sslrootcert?: string;
  /** Name of an environment variable holding a postgres:// connection string. */
  readonly connectionStringEnv?: string;
  /** Statement timeout in milliseconds (default 300000). */
  readonly statementTimeoutMs?: number;
  /** Saved queries offered by the editor command: name → SELECT. */
  readonly queries?: Readonly<Record<string, string>>;
}

/** What the client needs to connect (no secret is ever put in a message built from this). */
export interface ResolvedConnection {
  readonly name: string;
  readonly host: string;
  readonly port: number;
  readonly database: string;
  readonly user: string;
  readonly password?: string;
  readonly sslmode: TlsMode;
  readonly sslrootcert?: string;
  readonly statementTimeoutMs: number;
  /** Where the settings came from, for messages: "settings", "environment variable X". */
  readonly origin: string;
}

export type Environment = Readonly<Record<string, string | undefined>>;

export const defaultStatementTimeoutMs = 300_000;

/** Environment variable consulted when a connection name is not in the settings. */
export function connectionEnvName(name: string): string {
  return `COUNTERCHECK_CONNECTION_${name.toUpperCase().replace(/[^A-Z0-9]/g, '_')}`;
}

const location = { jsonPath: '$.source.sql.connection' };

/** A postgres:// or postgresql:// URL split into fields. */
function parseConnectionString(text: string, origin: string): ConnectionSettings & { password?: string } {
  let url: URL;
  try {
    url = new URL(text);
  } catch {
    throw new InputError(`${origin} does not hold a valid connection string (expected postgresql://user@host:port/database)`, location, 'sql-connection-string');
  }
  if (url.protocol !== 'postgres:' && url.protocol !== 'postgresql:') {
    throw new InputError(`${origin} holds a ${url.protocol} URL; expected postgresql://…`, location, 'sql-connection-string');
  }
  const sslmode = url.searchParams.get('sslmode') ?? undefined;
  return {
    host: url.hostname ? decodeURIComponent(url.hostname) : undefined,
    port: url.port ? Number(url.port) : undefined,
    database: url.pathname.length > 1 ? decodeURIComponent(url.pathname.slice(1)) : undefined,
    user: url.username ? decodeURIComponent(url.username) : undefined,
    password: url.password ? decodeURIComponent(url.password) : undefined,
    sslmode: sslmode as TlsMode | undefined,
    sslrootcert: url.searchParams.get('sslrootcert') ?? undefined,
  };
}

function isLocal(host: string): boolean {
  return host.startsWith('/') || host === 'localhost' || host === '127.0.0.1' || host === '::1';
}

/**
 * Resolves a connection name. `password` (from secret storage) wins over PGPASSWORD, which wins
 * over a password inside an environment connection string.
 */
export function resolveConnection(
  name: string,
  connections: Readonly<Record<string, ConnectionSettings>> | undefined,
  env: Environment,
  password?: string,
): ResolvedConnection {
  const configured = connections?.[name];
  let fields: ConnectionSettings & { password?: string };
  let origin: string;
  if (configured) {
    if ('password' in (configured as object)) {
      throw new InputError(
        `connection "${name}": a password does not belong in settings; use the editor's "set password" prompt, PGPASSWORD or ~/.pgpass`,
        location,
        'sql-password-in-settings',
      );
    }
    origin = 'settings countercheck.connections';
    fields = { ...configured };
    if (configured.connectionStringEnv) {
      const text = env[configured.connectionStringEnv];
      if (!text) throw new InputError(`connection "${name}": environment variable ${configured.connectionStringEnv} is not set`, location, 'sql-connection-unknown');
      fields = { ...parseConnectionString(text, `environment variable ${configured.connectionStringEnv}`), ...stripUndefined(configured) };
      origin = `environment variable ${configured.connectionStringEnv}`;
    }
  } else {
    const envName = connectionEnvName(name);
    const text = env[envName];
    if (!text) {
      const known = Object.keys(connections ?? {});
      throw new InputError(
        `no connection named "${name}": add it to the setting countercheck.connections${known.length ? ` (known: ${known.join(', ')})` : ''} or set ${envName} to a connection string`,
        location,
        'sql-connection-unknown',
      );
    }
    fields = parseConnectionString(text, `environment variable ${envName}`);
    origin = `environment variable ${envName}`;
  }
  const host = fields.host ?? env.PGHOST ?? 'localhost';
  const portText = fields.port ?? env.PGPORT ?? 5432;
  const port = Number(portText);
  if (!Number.isInteger(port) || port < 1 || port > 65535) {
    throw new InputError(`connection "${name}": port ${String(portText)} is not a TCP port number`, location, 'sql-connection-port');
  }
  const user = fields.user ?? env.PGUSER ?? env.USER ?? 'postgres';
  const database = fields.database ?? env.PGDATABASE ?? user;
  const sslmode = (fields.sslmode ?? (env.PGSSLMODE as TlsMode | undefined) ?? (isLocal(host) ? 'disable' : 'verify-full')) as string;
  if (!(tlsModes as readonly string[]).includes(sslmode)) {
    throw new InputError(`connection "${name}": TLS mode "${sslmode}" is not one of ${tlsModes.join(', ')}`, location, 'sql-connection-tls');
  }
  const timeout = fields.statementTimeoutMs ?? defaultStatementTimeoutMs;
  if (!Number.isInteger(timeout) || timeout <= 0) {
    throw new InputError(`connection "${name}": statementTimeoutMs must be a positive whole number of milliseconds`, location, 'sql-connection-timeout');
  }
  return {
    name,
    host,
    port,
    database,
    user,
    password: password ?? env.PGPASSWORD ?? fields.password,
    sslmode: sslmode as TlsMode,
    sslrootcert: fields.sslrootcert ?? env.PGSSLROOTCERT,
    statementTimeoutMs: timeout,
    origin,
  };
}

function stripUndefined<T extends object>(o: T): Partial<T> {
  return Object.fromEntries(Object.entries(o).filter(([, v]) => v !== undefined)) as Partial<T>;
}

/** One line for logs and messages: never the password. */
export function describeConnection(c: ResolvedConnection): string {
  return `"${c.name}" (${c.user}@${c.host}:${c.port}/${c.database}, TLS ${c.sslmode})`;
}
