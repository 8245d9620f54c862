/**
 * The command line's options: one table per command for Node's `util.parseArgs` (strict), its usage text with
 * examples, and the checks of option values. An option that is unknown or belongs to another command is a
 * UsageError carrying that command's usage (exit 2).
 */
import { parseArgs, type ParseArgsConfig } from 'node:util';
import { DEFAULT_FRAGILITY_THRESHOLD } from '../savedtest/family';

export type Command = 'run' | 'check' | 'report';
export const COMMANDS: readonly Command[] = ['run', 'check', 'report'];

/** Decimals shown for statistics: the same range as the editor's `countercheck.decimals` setting (a test compares them). */
export const DECIMALS = { min: 0, max: 8, default: 2 } as const;

export type OutputFormat = 'text' | 'markdown' | 'json' | 'csv';
export const OUTPUT_FORMATS: readonly OutputFormat[] = ['text', 'markdown', 'json', 'csv'];
export type FailOn = 'result' | 'conclusion' | 'data';
export const FAIL_ON: readonly FailOn[] = ['result', 'conclusion', 'data'];
export type AdjustMethod = 'holm' | 'bh' | 'bonferroni';
export const ADJUST_METHODS: readonly AdjustMethod[] = ['holm', 'bh', 'bonferroni'];

type Options = NonNullable<ParseArgsConfig['options']>;

const shared = {
  help: { type: 'boolean', short: 'h' },
  quiet: { type: 'boolean', short: 'q' },
  'allow-outside': { type: 'boolean' },
} as const satisfies Options;

export const OPTION_TABLES = {
  run: {
    ...shared,
    json: { type: 'boolean' },
    format: { type: 'string' },
    record: { type: 'boolean' },
    force: { type: 'boolean' },
    decimals: { type: 'string' },
    data: { type: 'string' },
    plots: { type: 'string' },
    adjust: { type: 'string' },
  },
  check: {
    ...shared,
    json: { type: 'boolean' },
    junit: { type: 'string' },
    'fail-on': { type: 'string' },
    data: { type: 'string' },
    adjust: { type: 'string' },
    'fragility-threshold': { type: 'string' },
  },
  report: {
    ...shared,
    check: { type: 'boolean' },
    decimals: { type: 'string' },
    adjust: { type: 'string' },
  },
} as const satisfies Record<Command, Options>;

const COMMON_HELP = `  --allow-outside       let specs read files outside the current folder (absolute paths, ..)
  -q, --quiet           print nothing but errors (machine output asked for with --json, --junit or --format
                        is still written); the exit code says the outcome
  -h, --help            this help`;

const INPUTS_HELP = `Inputs: spec files, folders (searched recursively for *.countercheck.json, skipping node_modules and
folders whose name starts with a dot) and quoted globs ('specs/**/*.countercheck.json'); - reads one spec
from standard input.`;

export const USAGE: Readonly<Record<Command, string>> = {
  run: `Usage: countercheck run [options] <spec|folder|glob|-…>

Runs each saved test and prints its result.

Options:
  --format text|markdown|json|csv
                        text (default): a plain-text summary per spec; markdown: the report block text;
                        json: one JSON object (an array for several inputs); csv: one row per input
  --json                the same as --format json
  --record              store the result seen in the spec ("recorded"); a different earlier record is only
                        replaced with --force, and what changes is printed
  --force               with --record: replace a different earlier record
  --decimals N          decimals for statistics in text and markdown (${DECIMALS.min} to ${DECIMALS.max}, default ${DECIMALS.default})
  --data FILE|-         read the data from FILE (- for standard input, as CSV) instead of the spec's
                        source path; one spec only
  --plots DIR           write each result's plots as SVG files into DIR
  --adjust holm|bh|bonferroni
                        the specs named are one family: each test result gains "family" (size, method,
                        adjustedPValue)
${COMMON_HELP}

${INPUTS_HELP}

Examples:
  countercheck run demo/bakery-oven-defects.countercheck.json
  countercheck run --json demo > results.json
  countercheck run --format csv 'demo/**/*.countercheck.json'
  export-counts | countercheck run --data - specs/weekly-defects.countercheck.json
  countercheck run --record --force demo/seed-coating-trial.countercheck.json

Exit codes: 0 success; 1 --record found a different earlier record and --force was not given;
2 a bad spec, bad data, an input that cannot be read, or a usage error.`,
  check: `Usage: countercheck check [options] <spec|folder|glob|report.md|-…>

Re-runs each saved test and compares it with its recorded result: reproduced, data changed, result differs
or cannot run. A markdown living report is checked block by block: each block's saved test is re-run and
compared with its recorded result (when it has one) and with the result the report shows under it.

Options:
  --json                one JSON array, an object per input
  --junit FILE          also write a JUnit XML report to FILE: one test case per saved test, the
                        comparison in the failure message
  --fail-on LIST        which changes fail the check, comma-separated: result (same data, different
                        numbers), conclusion (significance at α flipped), data (the data's fingerprint
                        changed). Default: result,conclusion,data
  --data FILE|-         compare using the data in FILE (- for standard input, as CSV); one spec only
  --adjust holm|bh|bonferroni
                        also adjust the current p-values across the checked specs (or a report's
                        blocks) for multiplicity (Holm, Benjamini–Hochberg or Bonferroni) and show them
                        beside each result
  --fragility-threshold N
                        flag a recorded significant conclusion whose fragility index is at most N
                        (default 2): so few changed outcomes would make it not significant
${COMMON_HELP}

${INPUTS_HELP}

Examples:
  countercheck check demo
  countercheck check --junit reports/countercheck.xml --fail-on result,conclusion 'specs/**/*.countercheck.json'
  countercheck check --json --adjust holm specs > review.json
  countercheck check --adjust holm demo/report.md

Exit codes: 0 no change that --fail-on names; 1 some change that --fail-on names; 2 some input cannot run
(or a usage error).`,
  report: `Usage: countercheck report [options] <file.md…>

Refreshes the living result blocks (\`\`\`countercheck fences) of markdown reports in place.

Options:
  --check               only say what would change; the files stay as they are
  --decimals N          decimals for statistics (${DECIMALS.min} to ${DECIMALS.max}, default ${DECIMALS.default})
  --adjust holm|bh|bonferroni
                        the blocks of a report are one family: each result shows its adjusted p-value
${COMMON_HELP}

Examples:
  countercheck report demo/report.md
  countercheck report --check docs/*.md

Exit codes: 0 success; 1 with --check, a block would change; 2 a block cannot run, a report cannot be read,
or a usage error.`,
};

export function helpText(version: string): string {
  return `countercheck ${version}: chi-square procedures from saved test specs (*.countercheck.json)

Usage:
  countercheck run <spec…>        run each spec and print its result
  countercheck check <spec…>      re-run each spec and compare with its recorded result
  countercheck report <file.md…>  refresh the living result blocks in markdown reports
  countercheck <command> --help   the command's options and examples
  countercheck --version

Database sources: a connection name is looked up in "countercheck.connections" of the nearest
.vscode/settings.json at or above the spec's folder, else in COUNTERCHECK_CONNECTION_<NAME> (a
postgresql:// URL); the password comes from PGPASSWORD or ~/.pgpass.

Exit codes:
  run, report: 0 success; 2 a bad spec or bad data (message on stderr with file:line:column and JSON path)
  run --record: 1 when an earlier record differs and --force was not given
  check: 0 all reproduced; 1 some data changed or results differ; 2 some cannot run
         (--fail-on chooses which changes count)
  report --check: 1 when a block would change; 2 when a block cannot run
  any command: 2 a usage error (unknown option, an option of another command, a bad value);
               141 standard output was closed before everything was written (e.g. piped into head)
`;
}

/** A mistake in the command line itself: exit 2 with the command's usage. */
export class UsageError extends Error {
  constructor(
    message: string,
    readonly command?: Command,
  ) {
    super(message);
  }
}

export interface RunFlags {
  readonly command: 'run';
  readonly format: OutputFormat;
  readonly record: boolean;
  readonly force: boolean;
  readonly decimals: number;
  readonly data?: string;
  readonly plots?: string;
  readonly adjust?: AdjustMethod;
}
export interface CheckFlags {
  readonly command: 'check';
  readonly json: boolean;
  readonly junit?: string;
  readonly failOn: ReadonlySet<FailOn>;
  readonly data?: string;
  readonly adjust?: AdjustMethod;
  readonly fragilityThreshold: number;
}
export interface ReportFlags {
  readonly command: 'report';
  readonly check: boolean;
  readonly decimals: number;
  readonly adjust?: AdjustMethod;
}
export type CommandFlags = (RunFlags | CheckFlags | ReportFlags) & { readonly quiet: boolean; readonly allowOutside: boolean };

export type Parsed =
  | { readonly kind: 'version' }
  | { readonly kind: 'help'; readonly command?: Command }
  | { readonly kind: 'command'; readonly flags: CommandFlags; readonly inputs: readonly string[] };

function isCommand(word: string | undefined): word is Command {
  return (COMMANDS as readonly string[]).includes(word ?? '');
}

/** Which other commands take an option, for a message like "--json belongs to run, check". */
function ownersOf(option: string): Command[] {
  const name = option.replace(/^--?/, '').replace(/=.*$/, '');
  return COMMANDS.filter((c) => Object.entries(OPTION_TABLES[c]).some(([long, o]) => long === name || ('short' in o && o.short === name)));
}

function oneOf<T extends string>(command: Command, option: string, value: string, allowed: readonly T[]): T {
  if ((allowed as readonly string[]).includes(value)) return value as T;
  throw new UsageError(`--${option}: expected one of ${allowed.join(', ')}, found ${JSON.stringify(value)}`, command);
}

function fragilityThresholdOf(command: Command, value: string | undefined): number {
  if (value === undefined) return DEFAULT_FRAGILITY_THRESHOLD;
  const t = Number(value);
  if (!Number.isInteger(t) || t < 0) throw new UsageError(`--fragility-threshold: expected a whole number ≥ 0, found ${JSON.stringify(value)}`, command);
  return t;
}

function decimalsOf(command: Command, value: string | undefined): number {
  if (value === undefined) return DECIMALS.default;
  const d = Number(value);
  if (value.trim() === '' || !Number.isInteger(d) || d < DECIMALS.min || d > DECIMALS.max) {
    throw new UsageError(`--decimals: expected a whole number from ${DECIMALS.min} to ${DECIMALS.max}, found ${JSON.stringify(value)}`, command);
  }
  return d;
}

/** Reads the command line; throws UsageError for anything it cannot take. */
export function parseCommandLine(args: readonly string[]): Parsed {
  const [first, ...rest] = args;
  if (first === '--version' || first === '-v') return { kind: 'version' };
  if (first === undefined) throw new UsageError('name a command: run, check or report');
  if (first === '--help' || first === '-h') return { kind: 'help' };
  if (first === 'help') {
    if (rest[0] !== undefined && !isCommand(rest[0])) throw new UsageError(`unknown command "${rest[0]}"; expected run, check or report`);
    return { kind: 'help', command: rest[0] as Command | undefined };
  }
  if (!isCommand(first)) {
    throw new UsageError(first.startsWith('-') ? `name a command (run, check or report) before ${first}` : `unknown command "${first}"; expected run, check or report`);
  }
  const command = first;
  let values: Record<string, string | boolean | undefined>;
  let positionals: string[];
  try {
    ({ values, positionals } = parseArgs({ args: rest, options: OPTION_TABLES[command], allowPositionals: true, strict: true }));
  } catch (e) {
    const code = (e as { code?: string }).code;
    const option = /'(-[^']*)'/.exec((e as Error).message)?.[1] ?? '';
    if (code === 'ERR_PARSE_ARGS_UNKNOWN_OPTION') {
      const owners = ownersOf(option).filter((c) => c !== command);
      throw new UsageError(`unknown option ${option.split('=')[0]}${owners.length ? ` (it belongs to countercheck ${owners.join(', ')})` : ''}`, command);
    }
    if (code === 'ERR_PARSE_ARGS_INVALID_OPTION_VALUE') throw new UsageError((e as Error).message.replace(/^Option '([^']*)'.*argument missing$/, '$1: a value is missing'), command);
    throw new UsageError((e as Error).message, command);
  }
  if (values.help) return { kind: 'help', command };
  const common = { quiet: values.quiet === true, allowOutside: values['allow-outside'] === true };
  const str = (name: string) => values[name] as string | undefined;
  let flags: CommandFlags;
  if (command === 'run') {
    if (values.json && str('format') !== undefined && str('format') !== 'json') throw new UsageError(`--json and --format ${str('format')} ask for two different outputs`, command);
    const format = values.json ? 'json' : oneOf(command, 'format', str('format') ?? 'text', OUTPUT_FORMATS);
    if (values.force && !values.record) throw new UsageError('--force only goes with --record', command);
    // A record names the spec's own data (its path and fingerprint); data from elsewhere would contradict it.
    if (values.record && str('data') !== undefined) throw new UsageError('--record records the spec\'s own data; it cannot be combined with --data', command);
    const adjust = str('adjust');
    flags = { command, format, record: values.record === true, force: values.force === true, decimals: decimalsOf(command, str('decimals')), data: str('data'), plots: str('plots'), adjust: adjust === undefined ? undefined : oneOf(command, 'adjust', adjust, ADJUST_METHODS), ...common };
  } else if (command === 'check') {
    const failOn = str('fail-on');
    const kinds = failOn === undefined ? FAIL_ON : failOn.split(',').map((w) => oneOf(command, 'fail-on', w.trim(), FAIL_ON));
    const adjust = str('adjust');
    flags = {
      command,
      json: values.json === true,
      junit: str('junit'),
      failOn: new Set(kinds),
      data: str('data'),
      adjust: adjust === undefined ? undefined : oneOf(command, 'adjust', adjust, ADJUST_METHODS),
      fragilityThreshold: fragilityThresholdOf(command, str('fragility-threshold')),
      ...common,
    };
  } else {
    const adjust = str('adjust');
    flags = { command, check: values.check === true, decimals: decimalsOf(command, str('decimals')), adjust: adjust === undefined ? undefined : oneOf(command, 'adjust', adjust, ADJUST_METHODS), ...common };
  }
  for (const name of ['data', 'junit', 'plots'] as const) {
    if (name in flags && (flags as unknown as Record<string, unknown>)[name] === '') throw new UsageError(`--${name}: a file name is missing`, command);
  }
  if (positionals.length === 0) throw new UsageError(`name at least one ${command === 'report' ? 'markdown file' : 'spec file, folder or glob (or - for standard input)'}`, command);
  if (positionals.filter((f) => f === '-').length > 1) throw new UsageError('standard input (-) can be read only once', command);
  if ('data' in flags && flags.data !== undefined) {
    if (flags.data === '-' && positionals.includes('-')) throw new UsageError('--data - and a spec from standard input (-) cannot both read standard input', command);
  }
  return { kind: 'command', flags, inputs: positionals };
}
