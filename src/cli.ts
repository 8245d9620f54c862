/**
 * The command line: the same saved specs as the editor, for a terminal or a pipeline.
 *
 *   countercheck run <specs…> [--json] [--record [--force]] [--decimals N] [--allow-outside]
 *   countercheck check <specs, folders or reports…> [--json] [--adjust holm|bh|bonferroni] [--fragility-threshold N] [--allow-outside]
 *   countercheck report <report.md…> [--check] [--adjust holm|bh|bonferroni] [--decimals N] [--allow-outside]
 *
 * `main` takes its streams and folder as arguments so tests run it in-process.
 */
import { readdir, readFile, rename, stat, writeFile } from 'node:fs/promises';
import * as path from 'node:path';
import { aggregateFile } from './data/file';
import { sqlSpecReader } from './data/sql/index';
import { workspaceConnections } from './data/sql/settings';
import { errorMessage, isInputError, isInstance } from './errors';
import { parseReportBlocks, refreshReport, type ReportBlock } from './report/blocks';
import { resultJson } from './report/json';
import { resultText } from './report/text';
import { DEFAULT_FRAGILITY_THRESHOLD, MULTIPLICITY_METHODS, adjustFamily, describeFamily, familyJson, familyRenderer, familySection, type FamilyMember, type MultiplicityMethod } from './spec/family';
import { isInside } from './spec/paths';
import { describeRunError, runReportBlock, type BlockRunOptions } from './spec/living';
import { parseJsonWithLocations, type LocatedJson } from './spec/json-text';
import { STATUS_LABEL, TOLERANCE_TEXT, compareWithRecord, cannotRun, describeReview, makeRecord, reviewExitCode, reviewJson, writeRecordedInto, type Review } from './spec/review';
import { runSpec } from './spec/run';
import type { SpecReaders, SpecRun, SpecV1 } from './spec/types';
import { loadSpecText } from './spec/validate';
import packageJson from '../package.json';

export const VERSION: string = packageJson.version;
export const TOOL = `countercheck ${VERSION}`;

export interface CliIo {
  readonly stdout: (text: string) => void;
  readonly stderr: (text: string) => void;
  readonly readStdin: () => Promise<string>;
  readonly cwd: string;
  /** The clock, for recorded results (tests pass a fixed one). */
  readonly now?: () => Date;
  /** Readers (tests may pass fakes); default: the file readers and the SQL reader. */
  readonly readers?: SpecReaders;
  /** Aborted on Ctrl-C: a long read stops and the command exits 2. */
  readonly signal?: AbortSignal;
  /** Receives a one-line progress message for long reads (a terminal shows it in place). */
  readonly progress?: (line: string) => void;
}

export const HELP = `countercheck ${VERSION}: chi-square procedures from saved test specs (*.countercheck.json)

Usage:
  countercheck run <spec…>        run each spec and print a plain-text summary
      --json                      machine output: one JSON object (a JSON array for several specs)
      --record                    store the result seen in the spec ("recorded"); a different earlier
                                  record is only replaced with --force, and what changes is printed
      --decimals N                decimals for statistics in text output (default 2)
      --adjust holm|bh|bonferroni the specs named are one family: each result gains "family" (size,
                                  method, adjustedPValue)
      -                           read one spec from standard input
  countercheck check <spec…>      re-run each spec and compare with its recorded result:
                                  reproduced / data changed / result differs / cannot run;
                                  a folder means its *.countercheck.json files; a recorded significant
                                  conclusion with a fragility index at most the threshold is flagged
      --json                      one JSON array, an object per spec
      --adjust holm|bh|bonferroni read the specs (and the blocks of any report.md named) as one family:
                                  each adjusted p-value, the family size, which conclusions change
      --fragility-threshold N     flag fragility indices up to N (default ${DEFAULT_FRAGILITY_THRESHOLD})
  countercheck report <file.md…>  refresh the living result blocks (\`\`\`countercheck fences) in place
      --check                     only say what would change
      --adjust holm|bh|bonferroni the blocks are one family: each result shows its adjusted p-value
  --allow-outside                 let specs read files outside the current folder (absolute paths, ..)
  --help, --version

Database sources: a connection name is looked up in "countercheck.connections" of the nearest
.vscode/settings.json at or above the spec's folder, else in COUNTERCHECK_CONNECTION_<NAME> (a
postgresql:// URL); the password comes from PGPASSWORD or ~/.pgpass.

Exit codes:
  run, report: 0 success; 2 a bad spec or bad data (message on stderr with file:line:column and JSON path)
  run --record: 1 when an earlier record differs and --force was not given
  check: 0 all reproduced; 1 some data changed or results differ; 2 some cannot run
  report --check: 1 when a block would change; 2 when a block cannot run
`;

interface Flags {
  readonly json: boolean;
  readonly record: boolean;
  readonly force: boolean;
  readonly check: boolean;
  readonly allowOutside: boolean;
  readonly decimals: number;
  readonly adjust?: MultiplicityMethod;
  readonly fragilityThreshold: number;
}

class UsageError extends Error {}

function parseArgs(args: readonly string[]): { command?: string; files: string[]; flags: Flags; help: boolean; version: boolean } {
  const files: string[] = [];
  const flags: { -readonly [K in keyof Flags]: Flags[K] } = { json: false, record: false, force: false, check: false, allowOutside: false, decimals: 2, fragilityThreshold: DEFAULT_FRAGILITY_THRESHOLD };
  let command: string | undefined;
  let help = false;
  let version = false;
  for (let i = 0; i < args.length; i++) {
    const a = args[i];
    if (a === '--help' || a === '-h') help = true;
    else if (a === '--version' || a === '-v') version = true;
    else if (a === '--json') flags.json = true;
    else if (a === '--record') flags.record = true;
    else if (a === '--force') flags.force = true;
    else if (a === '--check') flags.check = true;
    else if (a === '--allow-outside') flags.allowOutside = true;
    else if (a === '--decimals' || a.startsWith('--decimals=')) {
      const v = a.includes('=') ? a.slice(a.indexOf('=') + 1) : args[++i];
      const d = Number(v);
      if (!Number.isInteger(d) || d < 0 || d > 12) throw new UsageError(`--decimals: expected a whole number from 0 to 12, found ${v === undefined ? 'nothing' : JSON.stringify(v)}`);
      flags.decimals = d;
    } else if (a === '--adjust' || a.startsWith('--adjust=')) {
      const v = a.includes('=') ? a.slice(a.indexOf('=') + 1) : args[++i];
      if (!MULTIPLICITY_METHODS.includes(v as MultiplicityMethod)) throw new UsageError(`--adjust: expected one of ${MULTIPLICITY_METHODS.join(', ')}, found ${v === undefined ? 'nothing' : JSON.stringify(v)}`);
      flags.adjust = v as MultiplicityMethod;
    } else if (a === '--fragility-threshold' || a.startsWith('--fragility-threshold=')) {
      const v = a.includes('=') ? a.slice(a.indexOf('=') + 1) : args[++i];
      const t = Number(v);
      if (!Number.isInteger(t) || t < 0) throw new UsageError(`--fragility-threshold: expected a whole number ≥ 0, found ${v === undefined ? 'nothing' : JSON.stringify(v)}`);
      flags.fragilityThreshold = t;
    } else if (a.startsWith('-') && a !== '-') throw new UsageError(`unknown option ${a} (see countercheck --help)`);
    else if (command === undefined) command = a;
    else files.push(a);
  }
  return { command, files, flags, help, version };
}

/** A file's text, or undefined when there is no such file. */
async function readIfExists(file: string): Promise<string | undefined> {
  try {
    return await readFile(file, 'utf8');
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code === 'ENOENT' || (e as NodeJS.ErrnoException).code === 'ENOTDIR') return undefined;
    throw e;
  }
}

/** `specFolder`: where a SQL source's named connections are looked for (.vscode/settings.json there or above). */
function defaultReaders(io: CliIo, specFolder: string = io.cwd): SpecReaders {
  return {
    aggregateFile: (file, request, options, control) =>
      aggregateFile(file, request, options, {
        signal: control.signal,
        onProgress: io.progress
          ? (p) => {
              if (p.totalBytes <= 32 * 1024 * 1024) return;
              if (p.bytesRead >= p.totalBytes) io.progress!('');
              else io.progress!(`reading ${options.file ?? file}: ${Math.round((100 * p.bytesRead) / p.totalBytes)}%, ${p.rows.toLocaleString('en-US')} records`);
            }
          : undefined,
      }),
    // Connections as the editor names them (no passwords there: PGPASSWORD or ~/.pgpass), else environment variables.
    aggregateSql: async (source, request, options, control) =>
      sqlSpecReader({ connections: (await workspaceConnections(specFolder, readIfExists))?.connections })(source, request, options, control),
  };
}

/** Where a spec may read from: the current folder when the spec lies inside it, else the spec's own folder. */
function allowedRootFor(specPath: string | undefined, io: CliIo): string {
  if (!specPath) return io.cwd;
  const absolute = path.resolve(io.cwd, specPath);
  return isInside(io.cwd, absolute) ? io.cwd : path.dirname(absolute);
}

interface Loaded {
  readonly name: string;
  readonly absolute?: string;
  readonly spec: SpecV1;
  readonly located: LocatedJson;
}

async function loadSpec(file: string, io: CliIo): Promise<Loaded> {
  if (file === '-') {
    const text = await io.readStdin();
    return { name: '<stdin>', ...loadSpecText(text, '<stdin>') };
  }
  const absolute = path.resolve(io.cwd, file);
  let text: string;
  try {
    text = await readFile(absolute, 'utf8');
  } catch (e) {
    throw new Error(`${file}: cannot read the spec: ${(e as NodeJS.ErrnoException).code === 'ENOENT' ? 'no such file' : (e as Error).message}`);
  }
  return { name: file, absolute, ...loadSpecText(text, file) };
}

async function runLoaded(loaded: Loaded, io: CliIo, flags: Flags): Promise<SpecRun> {
  try {
    return await runSpec(loaded.spec, {
      readers: io.readers ?? defaultReaders(io, loaded.absolute ? path.dirname(loaded.absolute) : io.cwd),
      signal: io.signal,
      specPath: loaded.absolute,
      allowedRoot: allowedRootFor(loaded.absolute, io),
      allowOutsideRoot: flags.allowOutside,
    });
  } catch (e) {
    throw new Error(describeRunError(e, loaded.name, loaded.located));
  }
}

function errorText(e: unknown, file: string): string {
  if (isInputError(e)) return describeRunError(e, file);
  return errorMessage(e);
}

/** Writes a file by renaming a sibling temporary file over it, so a crash never leaves half a spec. */
async function replaceFile(file: string, text: string): Promise<void> {
  const temporary = `${file}.${process.pid}.tmp`;
  await writeFile(temporary, text, 'utf8');
  await rename(temporary, file);
}

async function commandRun(files: readonly string[], flags: Flags, io: CliIo): Promise<number> {
  let exit = 0;
  const runs: { loaded: Loaded; run: SpecRun }[] = [];
  for (const file of files) {
    try {
      const loaded = await loadSpec(file, io);
      runs.push({ loaded, run: await runLoaded(loaded, io, flags) });
    } catch (e) {
      io.stderr(`${errorText(e, file)}\n`);
      exit = 2;
    }
  }
  // With --adjust the specs named are one family: each test's result carries its adjusted p-value.
  const family = flags.adjust ? adjustFamily(runs.map((r) => ({ name: r.loaded.name, result: r.run.result })), flags.adjust) : undefined;
  const outputs: unknown[] = [];
  for (const { loaded, run } of runs) {
    const section = family && run.result.kind === 'test' ? familySection(family, loaded.name) : undefined;
    const result = section && run.result.kind === 'test' ? { ...run.result, family: section } : run.result;
    const data = { ...run.data, ...(run.provenance ? { dropped: run.provenance.dropped } : {}) };
    if (flags.json) outputs.push({ file: loaded.name, ...(loaded.spec.title ? { title: loaded.spec.title } : {}), ...resultJson(result), data });
    else {
      const text = resultText(result, { decimals: flags.decimals, title: loaded.spec.title, data });
      io.stdout(`${files.length > 1 ? `== ${loaded.name}\n` : ''}${text}${files.length > 1 ? '\n' : ''}`);
    }
    if (flags.record) {
      try {
        exit = Math.max(exit, await record(loaded, run, flags, io));
      } catch (e) {
        io.stderr(`${errorText(e, loaded.name)}\n`);
        exit = 2;
      }
    }
  }
  if (flags.json) io.stdout(JSON.stringify(files.length === 1 ? (outputs[0] ?? null) : outputs, null, 2) + '\n');
  return exit;
}

async function record(loaded: Loaded, run: SpecRun, flags: Flags, io: CliIo): Promise<number> {
  if (!loaded.absolute) {
    io.stderr('--record: a spec read from standard input cannot be updated; save it to a file first\n');
    return 2;
  }
  const now = (io.now ?? (() => new Date()))();
  if (loaded.spec.recorded !== undefined) {
    const review = compareWithRecord(loaded.spec.recorded, run, TOOL, now);
    if (review.status === 'reproduced') {
      io.stderr(`${loaded.name}: the recorded result is reproduced; the spec is unchanged\n`);
      return 0;
    }
    if (!flags.force) {
      io.stderr(`${describeReview(review, loaded.name)}\n${loaded.name}: not overwritten; run again with --record --force to replace the earlier record\n`);
      return 1;
    }
    io.stderr(`${describeReview(review, loaded.name)}\n${loaded.name}: the earlier record is replaced (--force)\n`);
  }
  const updated = writeRecordedInto(loaded.located, makeRecord(run, TOOL, now));
  // Safety: the rewritten file must parse and differ from the original in "recorded" only.
  const reparsed = parseJsonWithLocations(updated, loaded.name).value as Record<string, unknown>;
  const { recorded: _before, ...before } = loaded.spec;
  const { recorded: _after, ...after } = reparsed;
  if (JSON.stringify(before) !== JSON.stringify(after)) throw new Error(`${loaded.name}: internal check failed while writing the record; the spec was not changed`);
  await replaceFile(loaded.absolute, updated);
  io.stderr(`${loaded.name}: recorded (${run.data.description}, ${run.data.rows} rows, sha256 ${run.data.sha256.slice(0, 12)}…)\n`);
  return 0;
}

async function commandCheck(args: readonly string[], flags: Flags, io: CliIo): Promise<number> {
  const { specs, reports } = await checkTargets(args, io);
  const reviews: { file: string; review: Review }[] = [];
  const members: FamilyMember[] = [];
  for (const file of specs) {
    let review: Review;
    try {
      const loaded = await loadSpec(file, io);
      const run = await runLoaded(loaded, io, flags);
      review = compareWithRecord(loaded.spec.recorded, run, TOOL, (io.now ?? (() => new Date()))(), flags.fragilityThreshold);
      members.push({ name: file, result: run.result });
    } catch (e) {
      review = cannotRun(errorText(e, file));
    }
    reviews.push({ file, review });
  }
  let blocksFailed = false;
  for (const file of reports) {
    const absolute = path.resolve(io.cwd, file);
    for (const block of parseReportBlocks(await readFile(absolute, 'utf8'))) {
      try {
        const { run } = await runReportBlock(block, blockOptions(absolute, flags, io));
        members.push({ name: `${file}:${block.fenceLine}`, result: run.result });
      } catch (e) {
        blocksFailed = true;
        io.stderr(`${file}:${block.fenceLine}: cannot run: ${errorMessage(e)}\n`);
      }
    }
  }
  const family = flags.adjust ? adjustFamily(members, flags.adjust) : undefined;
  if (flags.json) {
    const entries = reviews.map((r) => reviewJson(r.review, r.file));
    io.stdout(JSON.stringify(family ? { reviews: entries, family: familyJson(family) } : entries, null, 2) + '\n');
  } else {
    for (const r of reviews) io.stdout(`${describeReview(r.review, r.file)}\n`);
    const counts = new Map<string, number>();
    for (const r of reviews) counts.set(STATUS_LABEL[r.review.status], (counts.get(STATUS_LABEL[r.review.status]) ?? 0) + 1);
    if (reviews.length) io.stdout(`${[...counts].map(([label, n]) => `${n} ${label}`).join(', ')} (tolerance: ${TOLERANCE_TEXT})\n`);
    if (family) io.stdout(`${describeFamily(family)}\n`);
  }
  return Math.max(reviews.length ? reviewExitCode(reviews.map((r) => r.review)) : 0, blocksFailed ? 2 : 0);
}

/** Spec files to review and reports whose blocks join the family: a folder stands for its *.countercheck.json files. */
async function checkTargets(args: readonly string[], io: CliIo): Promise<{ specs: string[]; reports: string[] }> {
  const specs: string[] = [];
  const reports: string[] = [];
  for (const arg of args) {
    const info = arg === '-' ? undefined : await stat(path.resolve(io.cwd, arg)).catch(() => undefined);
    if (info?.isDirectory()) {
      const names = (await readdir(path.resolve(io.cwd, arg))).filter((n) => n.endsWith('.countercheck.json')).sort();
      specs.push(...names.map((n) => path.join(arg, n)));
    } else if (arg.toLowerCase().endsWith('.md')) reports.push(arg);
    else specs.push(arg);
  }
  return { specs, reports };
}

/** How the blocks of the report at `absolute` run (shared by `report` and `check`). */
function blockOptions(absolute: string, flags: Flags, io: CliIo): BlockRunOptions {
  return {
    reportPath: absolute,
    readers: io.readers ?? defaultReaders(io, path.dirname(absolute)),
    signal: io.signal,
    readText: (f) => readFile(f, 'utf8'),
    allowedRoot: allowedRootFor(absolute, io),
    allowOutsideRoot: flags.allowOutside,
    format: { decimals: flags.decimals },
  };
}

async function commandReport(files: readonly string[], flags: Flags, io: CliIo): Promise<number> {
  let exit = 0;
  for (const file of files) {
    const absolute = path.resolve(io.cwd, file);
    let text: string;
    try {
      text = await readFile(absolute, 'utf8');
    } catch (e) {
      io.stderr(`${file}: cannot read the report: ${(e as Error).message}\n`);
      exit = 2;
      continue;
    }
    const runBlock = (block: ReportBlock) => runReportBlock(block, blockOptions(absolute, flags, io));
    const family = flags.adjust ? await familyRenderer(text, runBlock, flags.adjust, { decimals: flags.decimals }) : undefined;
    const outcome = await refreshReport(text, family ? family.render : async (block) => (await runBlock(block)).markdown);
    if (family) io.stdout(`${file}: ${describeFamily(family.adjustment).replace(/\n {2}(\d+):/g, (_, i: string) => `\n  block ${Number(i) + 1}:`)}\n`);
    for (const b of outcome.blocks) {
      const state = b.error ? 'cannot run' : b.changed ? (flags.check ? 'would change' : 'updated') : 'unchanged';
      io.stdout(`${file}:${b.fenceLine}: block ${b.index + 1}: ${state}\n`);
      if (b.error) io.stderr(`${b.error.split('\n').map((l) => l.replace(absolute, file)).join('\n')}\n`);
    }
    if (outcome.blocks.length === 0) io.stdout(`${file}: no \`\`\`countercheck blocks\n`);
    const changed = outcome.text !== text;
    if (flags.check) {
      if (changed) exit = Math.max(exit, 1);
    } else if (changed) {
      await replaceFile(absolute, outcome.text);
    }
    if (outcome.blocks.some((b) => b.error)) exit = 2;
  }
  return exit;
}

export async function main(args: readonly string[], io: CliIo): Promise<number> {
  let parsed: ReturnType<typeof parseArgs>;
  try {
    parsed = parseArgs(args);
  } catch (e) {
    io.stderr(`${(e as Error).message}\n`);
    return 2;
  }
  const { command, files, flags } = parsed;
  if (parsed.version) {
    io.stdout(`${VERSION}\n`);
    return 0;
  }
  if (parsed.help || command === undefined || command === 'help') {
    (command === undefined && !parsed.help ? io.stderr : io.stdout)(HELP);
    return command === undefined && !parsed.help ? 2 : 0;
  }
  if (!['run', 'check', 'report'].includes(command)) {
    io.stderr(`unknown command "${command}"; expected run, check or report (see countercheck --help)\n`);
    return 2;
  }
  if (files.length === 0) {
    io.stderr(`countercheck ${command}: name at least one ${command === 'report' ? 'markdown file' : 'spec file (or - for standard input)'}\n`);
    return 2;
  }
  if (files.filter((f) => f === '-').length > 1) {
    io.stderr('standard input (-) can be read only once\n');
    return 2;
  }
  if (command === 'run') return commandRun(files, flags, io);
  if (command === 'check') return commandCheck(files, flags, io);
  return commandReport(files, flags, io);
}

async function readAll(stream: NodeJS.ReadableStream): Promise<string> {
  let text = '';
  stream.setEncoding('utf8');
  for await (const chunk of stream) text += String(chunk);
  return text;
}

// Run when executed as a program: `node dist/cli.js …` or through bin/countercheck.js.
if (require.main === module || /[\\/]bin[\\/]countercheck(\.js)?$/.test(require.main?.filename ?? '')) {
  const interrupt = new AbortController();
  process.once('SIGINT', () => interrupt.abort());
  let progressShown = false;
  main(process.argv.slice(2), {
    stdout: (t) => process.stdout.write(t),
    stderr: (t) => {
      if (progressShown) process.stderr.write('\r\x1b[K');
      progressShown = false;
      process.stderr.write(t);
    },
    readStdin: () => readAll(process.stdin),
    cwd: process.cwd(),
    signal: interrupt.signal,
    progress: process.stderr.isTTY
      ? (line) => {
          process.stderr.write(`\r\x1b[K${line}`);
          progressShown = line !== '';
        }
      : undefined,
  }).then(
    (code) => {
      process.exitCode = code;
    },
    (e: unknown) => {
      process.stderr.write(`countercheck: unexpected error: ${isInstance(e, Error) ? (e.stack ?? e.message) : String(e)}\n`);
      process.exitCode = 2;
    },
  );
}
