/**
 * The command line: the same saved specs as the editor, for a terminal or a pipeline.
 *
 *   countercheck run <inputs…> [--format text|markdown|json|csv | --json] [--record [--force]] [--decimals N] [--data FILE|-] [--plots DIR]
 *   countercheck check <inputs…> [--json] [--junit FILE] [--fail-on result,conclusion,data] [--data FILE|-] [--adjust holm|bh|bonferroni]
 *   countercheck report <report.md…> [--check] [--decimals N]
 *   (every command: --quiet, --allow-outside, --help; options in src/cli/options.ts)
 *
 * `main` takes its streams and folder as arguments so tests run it in-process.
 */
import { mkdir, mkdtemp, readFile, rename, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import * as path from 'node:path';
import { expandInputs, type InputFile } from './cli/inputs';
import { junitXml, type JunitCase } from './cli/junit';
import { DECIMALS, helpText, parseCommandLine, UsageError, USAGE, type AdjustMethod, type CheckFlags, type CommandFlags, type ReportFlags, type RunFlags } from './cli/options';
import { writeResultPlots } from './cli/plots';
import { aggregateFile, MAX_TEXT_FILE_BYTES, readTextFile } from './data/file';
import { sqlSpecReader } from './data/sql/index';
import { workspaceConnections } from './data/sql/settings';
import { errorMessage, InputError, isInputError, isInstance, type InputLocation } from './errors';
import { newlineOf, parseReportBlocks, refreshReport, resultRegion } from './report/blocks';
import { resultJson } from './report/json';
import { resultMarkdown } from './report/markdown';
import { CSV_HEADER, csvField, resultToCsv } from './report/tables';
import { resultText } from './report/text';
import { adjustPValues, type Adjustment } from './stats/procedures/posthoc';
import { isInside } from './savedtest/paths';
import { describeRunError, runReportBlock, type BlockRun, type BlockRunOptions } from './savedtest/living';
import { locatePath, parseJsonWithLocations, type LocatedJson } from './savedtest/json-text';
import { STATUS_LABEL, TOLERANCE_TEXT, WRITTEN_RESULT, compareWithRecord, cannotRun, changesOf, describeReview, makeRecord, reviewExitCode, reviewFails, reviewJson, writeRecordedInto, type Review } from './savedtest/review';
import { runSpec } from './savedtest/run';
import type { SpecReaders, SpecRun, SpecV1 } from './savedtest/types';
import { loadSpecText } from './savedtest/validate';
import { version as packageVersion } from '../package.json';
import { adjustFamily, describeFamily, familyRenderer, familySection } from './savedtest/family';
import type { ReportBlock } from './report/blocks';
import type { Result } from './stats/result';

export const VERSION: string = packageVersion;
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

export const HELP = helpText(VERSION);

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
    text = await readTextFile(absolute, file, MAX_TEXT_FILE_BYTES);
  } catch (e) {
    // A refusal of the file itself (a FIFO, a device, a folder, too large, outside the workspace) keeps its own message.
    if (isInputError(e) && e.code !== 'file-not-found') throw e;
    const code = (e as NodeJS.ErrnoException).code;
    const missing = isInputError(e) || code === 'ENOENT';
    const why = missing ? 'no such file' : code === 'EISDIR' ? 'a folder, not a file' : (e as Error).message;
    throw new InputError(`${file}: cannot read the spec: ${why}`, { file }, 'unreadable-spec');
  }
  return { name: file, absolute, ...loadSpecText(text, file) };
}

/** What replaces a spec's data file (`--data FILE` or `--data -`). */
interface DataOverride {
  /** The file read (a temporary copy of standard input for `-`). */
  readonly path: string;
  /** The name shown in messages and provenance. */
  readonly name: string;
}

async function runLoaded(loaded: Loaded, io: CliIo, flags: CommandFlags, data?: DataOverride): Promise<SpecRun> {
  let readers = io.readers ?? defaultReaders(io, loaded.absolute ? path.dirname(loaded.absolute) : io.cwd);
  if (data) {
    if (typeof loaded.spec.source?.path !== 'string') {
      throw new InputError(`--data replaces the data file a spec reads ("source": {"path": …}); this spec has none`, { jsonPath: loaded.spec.source ? '$.source' : '$' }, 'no-file-source');
    }
    const base = readers;
    readers = { ...base, aggregateFile: (_file, request, options, control) => base.aggregateFile(data.path, request, { ...options, file: data.name, description: data.name }, control) };
  }
  return runSpec(loaded.spec, {
    readers,
    signal: io.signal,
    specPath: loaded.absolute,
    allowedRoot: allowedRootFor(loaded.absolute, io),
    // With --data the spec's own path is never read, so its place does not matter.
    allowOutsideRoot: flags.allowOutside || data !== undefined,
  });
}

/** One line (or several for a spec with several problems) naming the input and the place. */
function errorText(e: unknown, name: string, located?: LocatedJson): string {
  if (isInputError(e) && e.message.startsWith(`${name}:`)) return e.message;
  if (isInputError(e) || (isInstance(e, Error) && e.name === 'AbortError')) return describeRunError(e, name, located);
  return `${name}: ${errorMessage(e)}`;
}

/** The machine form of a failed input: {"file", "error": {code, message, location}}. */
/** Where a failed input's problem is: the spec (line, column number, JSON path) or its data (line, column name). */
type ErrorLocation = Omit<InputLocation, 'column'> & { readonly column?: string | number };

function errorEntry(e: unknown, name: string, located?: LocatedJson): { file: string; error: { code: string; message: string; location: ErrorLocation } } {
  let location: ErrorLocation = { file: name };
  let code = 'error';
  if (isInputError(e)) {
    code = e.code;
    const jsonPath = e.location.jsonPath;
    const at = located && jsonPath ? locatePath(located, jsonPath) : undefined;
    // A data error is located in the data file; a spec error in the spec.
    location = e.location.file !== undefined && e.location.file !== name ? { ...e.location, ...(jsonPath ? { jsonPath } : {}) } : { file: name, ...(at ?? { line: e.location.line, column: /^\d+$/.test(e.location.column ?? '') ? Number(e.location.column) : e.location.column }), ...(jsonPath ? { jsonPath } : {}) };
    location = Object.fromEntries(Object.entries(location).filter(([, v]) => v !== undefined)) as ErrorLocation;
  } else if (isInstance(e, Error) && e.name === 'AbortError') code = 'cancelled';
  return { file: name, error: { code, message: errorText(e, name, located), location } };
}

/** Writes a file by renaming a sibling temporary file over it, so a crash never leaves half a spec. */
async function replaceFile(file: string, text: string): Promise<void> {
  const temporary = `${file}.${process.pid}.tmp`;
  await writeFile(temporary, text, 'utf8');
  await rename(temporary, file);
}

/** Standard input saved to a temporary file for `--data -` (the file readers stream from a path); removed after. */
async function withDataOverride<T>(flag: string | undefined, io: CliIo, use: (data: DataOverride | undefined) => Promise<T>): Promise<T> {
  if (flag === undefined) return use(undefined);
  if (flag !== '-') return use({ path: path.resolve(io.cwd, flag), name: flag });
  const folder = await mkdtemp(path.join(tmpdir(), 'countercheck-stdin-'));
  try {
    const file = path.join(folder, 'stdin.csv');
    await writeFile(file, await io.readStdin(), 'utf8');
    return await use({ path: file, name: '<stdin>' });
  } finally {
    await rm(folder, { recursive: true, force: true });
  }
}

/** `--format csv`: every result in long form (src/report/tables.ts), one header; a failed input is one `error` line. */
function csvOutput(entries: readonly { file: string; csv?: string; error?: { code: string; message: string } }[]): string {
  const header = CSV_HEADER;
  const body = entries.map((e) =>
    e.csv !== undefined ? e.csv.slice(e.csv.indexOf('\n') + 1) : `${[e.file, 'error', e.error?.code ?? '', '', '', e.error?.message ?? ''].map(csvField).join(',')}\n`,
  );
  return header + '\n' + body.join('');
}

async function commandRun(files: readonly InputFile[], flags: RunFlags & CommandFlags, io: CliIo, single: boolean): Promise<number> {
  let exit = 0;
  const outputs: Record<string, unknown>[] = [];
  const csvEntries: Parameters<typeof csvOutput>[0][number][] = [];
  const texts: string[] = [];
  // With --adjust: every result, where its JSON and text went, to add the family once all have run.
  const members: { name: string; result: Result; output: number; text: number; render: (r: Result) => string }[] = [];
  await withDataOverride(flags.data, io, async (data) => {
    for (const input of files) {
      let loaded: Loaded | undefined;
      try {
        if (input.error) throw new InputError(input.error.message, { file: input.name }, input.error.code);
        loaded = await loadSpec(input.name, io);
        const run = await runLoaded(loaded, io, flags, data);
        const dataJson = { ...run.data, ...(run.provenance ? { dropped: run.provenance.dropped } : {}) };
        outputs.push({ file: loaded.name, ...(loaded.spec.title ? { title: loaded.spec.title } : {}), ...resultJson(run.result), data: dataJson });
        if (flags.format === 'csv') csvEntries.push({ file: loaded.name, csv: resultToCsv(run.result, loaded.name) });
        const title = loaded.spec.title;
        const name = loaded.name;
        const render = (result: Result): string =>
          flags.format === 'markdown'
            ? `${resultMarkdown(result, { decimals: flags.decimals, title })}\n`
            : `${single ? '' : `== ${name}\n`}${resultText(result, { decimals: flags.decimals, title, data: dataJson })}${single ? '' : '\n'}`;
        if (flags.format === 'text' || flags.format === 'markdown') texts.push(render(run.result));
        members.push({ name, result: run.result, output: outputs.length - 1, text: texts.length - 1, render });
        if (flags.plots !== undefined) {
          const base = path.basename(loaded.name).replace(/\.countercheck\.json$|\.json$/, '') || 'stdin';
          const written = await writeResultPlots(path.resolve(io.cwd, flags.plots), base, run.result, flags.decimals);
          if (!flags.quiet) for (const f of written) io.stderr(`${loaded.name}: plot written to ${path.relative(io.cwd, f)}\n`);
        }
        if (flags.record) exit = Math.max(exit, await record(loaded, run, flags, io));
      } catch (e) {
        const name = loaded?.name ?? (input.name === '-' ? '<stdin>' : input.name);
        const entry = errorEntry(e, name, loaded?.located);
        outputs.push(entry);
        csvEntries.push({ file: name, error: entry.error });
        io.stderr(`${entry.error.message}\n`);
        exit = 2;
      }
    }
  });
  if (flags.adjust) {
    const adjustment = adjustFamily(members, flags.adjust);
    for (const m of members) {
      const section = familySection(adjustment, m.name);
      if (!section || m.result.kind !== 'test') continue;
      outputs[m.output] = { ...outputs[m.output], family: section };
      if (m.text >= 0 && texts[m.text] !== undefined) texts[m.text] = m.render({ ...m.result, family: section });
    }
  }
  if (flags.format === 'json') io.stdout(JSON.stringify(single ? (outputs[0] ?? null) : outputs, null, 2) + '\n');
  else if (flags.format === 'csv') io.stdout(csvOutput(csvEntries));
  else if (!flags.quiet) io.stdout(texts.join(flags.format === 'markdown' ? '\n' : ''));
  return exit;
}

async function record(loaded: Loaded, run: SpecRun, flags: RunFlags & CommandFlags, io: CliIo): Promise<number> {
  const note = (text: string) => {
    if (!flags.quiet) io.stderr(text);
  };
  if (!loaded.absolute) {
    io.stderr('--record: a spec read from standard input cannot be updated; save it to a file first\n');
    return 2;
  }
  const now = (io.now ?? (() => new Date()))();
  if (loaded.spec.recorded !== undefined) {
    const review = compareWithRecord(loaded.spec.recorded, run, TOOL, now);
    if (review.status === 'reproduced') {
      note(`${loaded.name}: the recorded result is reproduced; the spec is unchanged\n`);
      return 0;
    }
    if (!flags.force) {
      io.stderr(`${describeReview(review, loaded.name)}\n${loaded.name}: not overwritten; run again with --record --force to replace the earlier record\n`);
      return 1;
    }
    note(`${describeReview(review, loaded.name)}\n${loaded.name}: the earlier record is replaced (--force)\n`);
  }
  const updated = writeRecordedInto(loaded.located, makeRecord(run, TOOL, now));
  // Safety: the rewritten file must parse and differ from the original in "recorded" only.
  const reparsed = parseJsonWithLocations(updated, loaded.name).value as Record<string, unknown>;
  const { recorded: _before, ...before } = loaded.spec;
  const { recorded: _after, ...after } = reparsed;
  if (JSON.stringify(before) !== JSON.stringify(after)) throw new Error(`${loaded.name}: internal check failed while writing the record; the spec was not changed`);
  await replaceFile(loaded.absolute, updated);
  note(`${loaded.name}: recorded (${run.data.description}, ${run.data.rows} rows, sha256 ${run.data.sha256.slice(0, 12)}…)\n`);
  return 0;
}

const ADJUSTMENT: Readonly<Record<AdjustMethod, { readonly method: Adjustment; readonly label: string }>> = {
  holm: { method: 'holm', label: 'Holm' },
  bh: { method: 'benjamini-hochberg', label: 'Benjamini–Hochberg' },
  bonferroni: { method: 'bonferroni', label: 'Bonferroni' },
};

interface Adjusted {
  readonly method: AdjustMethod;
  readonly family: number;
  readonly pValue: number;
  readonly alpha?: number;
  readonly significant?: boolean;
  /** The conclusion at α differs before and after the adjustment. */
  readonly changed?: boolean;
}

/** Adjusts the current p-values of the reviews that have one, across them all (one family). */
function adjustAcross(reviews: readonly Review[], method: AdjustMethod): (Adjusted | undefined)[] {
  const members = reviews.map((r, i) => ({ i, p: r.current?.result.pValue })).filter((m): m is { i: number; p: number } => typeof m.p === 'number' && Number.isFinite(m.p));
  const adjusted = adjustPValues(members.map((m) => m.p), ADJUSTMENT[method].method);
  const out: (Adjusted | undefined)[] = reviews.map(() => undefined);
  members.forEach((m, k) => {
    const alpha = reviews[m.i].current?.result.alpha;
    const before = reviews[m.i].current?.result.significant;
    const after = alpha !== undefined ? adjusted[k] < alpha : undefined;
    out[m.i] = { method, family: members.length, pValue: adjusted[k], ...(alpha !== undefined ? { alpha, significant: after } : {}), ...(before !== undefined && after !== undefined ? { changed: before !== after } : {}) };
  });
  return out;
}

function adjustedText(a: Adjusted): string {
  const verdict = a.significant === undefined ? '' : `; ${a.significant ? 'significant' : 'not significant'} at α = ${a.alpha} after adjustment${a.changed ? ' (the conclusion CHANGES)' : ''}`;
  return `  adjusted p (${ADJUSTMENT[a.method].label}, ${a.family} p-values): ${Number(a.pValue.toPrecision(4))}${verdict}`;
}

/** The comparison on one line, for a JUnit failure message: "data changed (data, conclusion): n 100 → 101; …". */
function comparisonLine(review: Review, changes: readonly string[]): string {
  const [, ...lines] = describeReview(review, '').split('\n');
  const head = `${STATUS_LABEL[review.status]}${changes.length ? ` (${changes.join(', ')})` : ''}`;
  return `${head}: ${lines.map((l) => l.trim()).join('; ')}`;
}

async function commandCheck(files: readonly InputFile[], flags: CheckFlags & CommandFlags, io: CliIo): Promise<number> {
  const reviews: { file: string; title?: string; review: Review; seconds: number; error?: ReturnType<typeof errorEntry> }[] = [];
  await withDataOverride(flags.data, io, async (data) => {
    for (const input of files) {
      if (!input.error && isMarkdownReport(input.name)) {
        // A living report: one review per block, and the blocks join the family like the specs of a folder.
        reviews.push(...(await reviewReport(input.name, flags, io)));
        continue;
      }
      const started = performance.now();
      let loaded: Loaded | undefined;
      let review: Review;
      let error: ReturnType<typeof errorEntry> | undefined;
      try {
        if (input.error) throw new InputError(input.error.message, { file: input.name }, input.error.code);
        loaded = await loadSpec(input.name, io);
        const run = await runLoaded(loaded, io, flags, data);
        review = compareWithRecord(loaded.spec.recorded, run, TOOL, (io.now ?? (() => new Date()))(), flags.fragilityThreshold);
      } catch (e) {
        error = errorEntry(e, loaded?.name ?? (input.name === '-' ? '<stdin>' : input.name), loaded?.located);
        review = cannotRun(error.error.message);
      }
      reviews.push({ file: loaded?.name ?? input.name, title: loaded?.spec.title, review, seconds: (performance.now() - started) / 1000, error });
    }
  });
  const adjusted = flags.adjust ? adjustAcross(reviews.map((r) => r.review), flags.adjust) : [];
  if (flags.json) {
    io.stdout(
      JSON.stringify(
        reviews.map((r, i) => ({ ...reviewJson(r.review, r.file), ...(r.error ? { error: r.error.error } : {}), fails: reviewFails(r.review, flags.failOn), ...(adjusted[i] ? { adjusted: adjusted[i] } : {}) })),
        null,
        2,
      ) + '\n',
    );
  } else if (!flags.quiet) {
    reviews.forEach((r, i) => {
      const ignored = r.review.status !== 'cannot-run' && r.review.status !== 'reproduced' && !reviewFails(r.review, flags.failOn) ? `\n  (does not fail the check: --fail-on ${[...flags.failOn].join(',')})` : '';
      io.stdout(`${describeReview(r.review, r.file)}${adjusted[i] ? `\n${adjustedText(adjusted[i]!)}` : ''}${ignored}\n`);
    });
    const counts = new Map<string, number>();
    for (const r of reviews) counts.set(STATUS_LABEL[r.review.status], (counts.get(STATUS_LABEL[r.review.status]) ?? 0) + 1);
    io.stdout(`${[...counts].map(([label, n]) => `${n} ${label}`).join(', ')} (tolerance: ${TOLERANCE_TEXT})\n`);
  } else {
    for (const r of reviews) if (r.review.status === 'cannot-run') io.stderr(`${r.review.reason}\n`);
  }
  if (flags.junit !== undefined) {
    const cases: JunitCase[] = reviews.map((r) => {
      const fails = reviewFails(r.review, flags.failOn);
      const changes = changesOf(r.review);
      return {
        file: r.file,
        title: r.title,
        seconds: r.seconds,
        outcome: r.review.status === 'cannot-run' ? 'error' : fails ? 'failed' : 'passed',
        summary: comparisonLine(r.review, changes),
        details: describeReview(r.review, r.file),
      };
    });
    try {
      await writeFile(path.resolve(io.cwd, flags.junit), junitXml('countercheck check', cases, (io.now ?? (() => new Date()))()), 'utf8');
    } catch (e) {
      io.stderr(`--junit: cannot write ${flags.junit}: ${errorMessage(e)}\n`);
      return 2;
    }
  }
  return reviewExitCode(reviews.map((r) => r.review), flags.failOn);
}

/** How the blocks of the report at `absolute` run: its folder's readers, and paths checked against its root. */
function blockRunOptions(absolute: string, flags: CommandFlags, io: CliIo): BlockRunOptions {
  return {
    reportPath: absolute,
    readers: io.readers ?? defaultReaders(io, path.dirname(absolute)),
    signal: io.signal,
    readText: (f) => readTextFile(f, path.relative(path.dirname(absolute), f), MAX_TEXT_FILE_BYTES),
    allowedRoot: allowedRootFor(absolute, io),
    allowOutsideRoot: flags.allowOutside,
  };
}

const isMarkdownReport = (name: string): boolean => /\.(md|markdown)$/i.test(name);

/**
 * Reviews every block of a living report: the block's saved test is re-run and compared with its `recorded` result
 * when it has one, and with the result the report shows between its markers (as `report` writes it, with or without
 * the family line of --adjust), so an edited or stale number in the report fails the check.
 */
async function reviewReport(file: string, flags: CheckFlags & CommandFlags, io: CliIo): Promise<{ file: string; title?: string; review: Review; seconds: number; error?: ReturnType<typeof errorEntry> }[]> {
  const absolute = path.resolve(io.cwd, file);
  let text: string;
  try {
    if (flags.data !== undefined) throw new InputError(`${file}: --data replaces one spec's data; a report's blocks keep their own`, { file }, 'data-with-report');
    text = await readTextFile(absolute, file, MAX_TEXT_FILE_BYTES);
  } catch (e) {
    const error = errorEntry(e, file);
    return [{ file, review: cannotRun(error.error.message), seconds: 0, error }];
  }
  const runs = new Map<number, Promise<BlockRun>>();
  const runBlock = (block: ReportBlock): Promise<BlockRun> => {
    if (!runs.has(block.index)) {
      runs.set(
        block.index,
        runReportBlock(block, blockRunOptions(absolute, flags, io)),
      );
    }
    return runs.get(block.index)!;
  };
  const family = flags.adjust ? await familyRenderer(text, runBlock, flags.adjust, { decimals: DECIMALS.default }) : undefined;
  const newline = newlineOf(text);
  const out: { file: string; title?: string; review: Review; seconds: number; error?: ReturnType<typeof errorEntry> }[] = [];
  for (const block of parseReportBlocks(text)) {
    const started = performance.now();
    const name = `${file}:${block.fenceLine} (block ${block.index + 1})`;
    let review: Review;
    let error: ReturnType<typeof errorEntry> | undefined;
    let title: string | undefined;
    try {
      if (block.problem) throw new InputError(block.problem, { file, line: block.fenceLine }, 'report-markers');
      const run = await runBlock(block);
      title = run.spec.title;
      const rendered = [run.markdown, ...(family ? [await family.render(block)] : [])].map((m) => resultRegion(m, newline));
      const written = block.existing;
      const byRecord = run.spec.recorded !== undefined ? compareWithRecord(run.spec.recorded, run.run, TOOL, (io.now ?? (() => new Date()))(), flags.fragilityThreshold) : undefined;
      if (written === undefined && !byRecord) throw new InputError(`${name}: no result written under the block and no recorded result; run \`countercheck report ${file}\` first`, { file, line: block.fenceLine }, 'no-recorded-result');
      const textDiffers = written !== undefined && !rendered.includes(written);
      const base: Review = byRecord ?? { status: 'reproduced', current: makeRecord(run.run, TOOL, (io.now ?? (() => new Date()))()), differences: [], tolerance: TOLERANCE_TEXT };
      review = base;
      if (textDiffers) {
        const difference = firstDifferentLine(written!, rendered[0]);
        review = { ...base, status: base.status === 'reproduced' ? 'result-differs' : base.status, differences: [...base.differences, { field: `${WRITTEN_RESULT}, line ${difference.line}`, recorded: difference.written, current: difference.now }] };
      }
    } catch (e) {
      error = errorEntry(e, name);
      review = cannotRun(error.error.message);
    }
    out.push({ file: name, title, review, seconds: (performance.now() - started) / 1000, error });
  }
  if (out.length === 0) {
    const error = errorEntry(new InputError(`${file}: no \`\`\`countercheck blocks`, { file }, 'no-blocks'), file);
    out.push({ file, review: cannotRun(error.error.message), seconds: 0, error });
  }
  return out;
}

/** The first line (1-based, within the result region) where the written result and the re-run's differ. */
function firstDifferentLine(written: string, now: string): { line: number; written: string; now: string } {
  const a = written.split(/\r?\n/);
  const b = now.split(/\r?\n/);
  let i = 0;
  while (i < a.length && i < b.length && a[i] === b[i]) i++;
  return { line: i + 1, written: a[i] ?? '(end of the result)', now: b[i] ?? '(end of the result)' };
}

async function commandReport(files: readonly InputFile[], flags: ReportFlags & CommandFlags, io: CliIo): Promise<number> {
  let exit = 0;
  const say = (text: string) => {
    if (!flags.quiet) io.stdout(text);
  };
  for (const input of files) {
    const file = input.name;
    if (input.error) {
      io.stderr(`${input.error.message}\n`);
      exit = 2;
      continue;
    }
    if (file === '-') {
      io.stderr('report: a report is refreshed in place; name its file (standard input cannot be refreshed)\n');
      exit = 2;
      continue;
    }
    const absolute = path.resolve(io.cwd, file);
    let text: string;
    try {
      text = await readTextFile(absolute, file, MAX_TEXT_FILE_BYTES);
    } catch (e) {
      const missing = isInputError(e) ? e.code === 'file-not-found' : (e as NodeJS.ErrnoException).code === 'ENOENT';
      io.stderr(`${file}: cannot read the report: ${missing ? 'no such file' : errorMessage(e)}\n`);
      exit = 2;
      continue;
    }
    // The plot files the blocks link to, by file: written beside the report once the blocks have run.
    const plotsToWrite = new Map<string, string>();
    const runBlock = async (block: ReportBlock) => {
      const run = await runReportBlock(block, { ...blockRunOptions(absolute, flags, io), format: { decimals: flags.decimals } });
      for (const plot of run.plots) plotsToWrite.set(plot.file, plot.svg);
      return run;
    };
    // With --adjust the blocks are one family: each result is written with its adjusted p-value.
    const family = flags.adjust ? await familyRenderer(text, runBlock, flags.adjust, { decimals: flags.decimals }) : undefined;
    if (family) say(`${file}: ${describeFamily(family.adjustment).replace(/\n {2}(\d+):/g, (_, i: string) => `\n  block ${Number(i) + 1}:`)}\n`);
    const outcome = await refreshReport(text, family ? family.render : async (block) => (await runBlock(block)).markdown);
    for (const b of outcome.blocks) {
      const state = b.error ? 'cannot run' : b.changed ? (flags.check ? 'would change' : 'updated') : 'unchanged';
      say(`${file}:${b.fenceLine}: block ${b.index + 1}: ${state}\n`);
      if (b.error) io.stderr(`${b.error.split('\n').map((l) => l.replace(absolute, file)).join('\n')}\n`);
    }
    if (outcome.blocks.length === 0) say(`${file}: no \`\`\`countercheck blocks\n`);
    const changed = outcome.text !== text;
    if (flags.check) {
      if (changed) exit = Math.max(exit, 1);
    } else if (changed) {
      await replaceFile(absolute, outcome.text);
    }
    // Plot files are written when their drawing changed; --check only says so.
    for (const [plotFile, svg] of plotsToWrite) {
      if ((await readIfExists(plotFile)) === svg) continue;
      const shown = path.relative(io.cwd, plotFile);
      if (flags.check) {
        say(`${shown}: plot would change\n`);
        exit = Math.max(exit, 1);
      } else {
        await mkdir(path.dirname(plotFile), { recursive: true });
        await writeFile(plotFile, svg, 'utf8');
        say(`${shown}: plot written\n`);
      }
    }
    if (outcome.blocks.some((b) => b.error)) exit = 2;
  }
  return exit;
}

export async function main(args: readonly string[], io: CliIo): Promise<number> {
  let parsed: ReturnType<typeof parseCommandLine>;
  try {
    parsed = parseCommandLine(args);
  } catch (e) {
    if (!isInstance(e, UsageError)) throw e;
    const usage = e.command ? USAGE[e.command] : HELP;
    io.stderr(`countercheck${e.command ? ` ${e.command}` : ''}: ${e.message}\n\n${usage}\n`);
    return 2;
  }
  if (parsed.kind === 'version') {
    io.stdout(`${VERSION}\n`);
    return 0;
  }
  if (parsed.kind === 'help') {
    io.stdout(parsed.command ? `${USAGE[parsed.command]}\n` : HELP);
    return 0;
  }
  const { flags, inputs } = parsed;
  const files = await expandInputs(inputs, io.cwd, flags.command === 'report' ? undefined : '.countercheck.json');
  if (flags.command !== 'report' && flags.data !== undefined && files.filter((f) => !f.error).length !== 1) {
    io.stderr(`countercheck ${flags.command}: --data replaces one spec's data; name exactly one spec (found ${files.filter((f) => !f.error).length})\n\n${USAGE[flags.command]}\n`);
    return 2;
  }
  // One plain file named: its JSON output is one object; anything that may name several gives an array.
  const single = inputs.length === 1 && files.length === 1 && files[0].name === inputs[0];
  if (flags.command === 'run') return commandRun(files, flags, io, single);
  if (flags.command === 'check') return commandCheck(files, flags, io);
  return commandReport(files, flags, io);
}

async function readAll(stream: NodeJS.ReadableStream): Promise<string> {
  let text = '';
  stream.setEncoding('utf8');
  for await (const chunk of stream) text += String(chunk);
  return text;
}

/** Exit status when standard output is closed early (`| head`): 128 + SIGPIPE, as a shell reports a tool killed by it. */
export const CLOSED_PIPE_EXIT = 141;

// Run when executed as a program: `node dist/cli.js …` or through bin/countercheck.js.
if (require.main === module || /[\\/]bin[\\/]countercheck(\.js)?$/.test(require.main?.filename ?? '')) {
  const interrupt = new AbortController();
  process.once('SIGINT', () => interrupt.abort());
  // A reader that stops early (`countercheck run --json … | head -c 10`) closes the pipe: stop quietly.
  for (const stream of [process.stdout, process.stderr]) {
    stream.on('error', (e: NodeJS.ErrnoException) => {
      if (e.code === 'EPIPE') process.exit(CLOSED_PIPE_EXIT);
      throw e;
    });
  }
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
      process.stderr.write(`countercheck: unexpected error: ${errorMessage(e)}\n`);
      process.exitCode = 2;
    },
  );
}
