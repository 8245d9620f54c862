/**
 * `runSpec`: the one code path from a saved spec to a result, shared by the command line, the editor's
 * commands, the Testing view and living report blocks. File access is injected (`SpecReaders`), so this
 * module reads nothing itself; it resolves and checks source paths, validates the whole spec before
 * anything runs, and returns the data fingerprint beside the result for recording and review.
 */
import * as path from 'node:path';
import { sha256Hex } from '../data/delimited';
import type { CategoryOptions, IntakeOptions, MissingOptions } from '../data/options';
import { deliveryNeeded, fileReaderFor, SQL_READER } from '../data/readers';
import type { Aggregate, AggregateRequest, Provenance } from '../data/types';
import { InputError } from '../errors';
import { withArgumentsLocated, type ArgumentOrigin } from './arguments';
import { EVIDENCE_ARGUMENTS, withEvidence } from './evidence';
import { resolveSourcePath } from './paths';
import { COMMON_FIELDS, procedureFor } from './procedures/index';
import type { DataFingerprint, RunContext, RunOptions, SourceNeeds, SourceSpec, SpecRun, SpecV1 } from './types';
import { assertValidSpec } from './validate';

export async function runSpec(value: unknown, options: RunOptions): Promise<SpecRun> {
  const spec = assertValidSpec(value, options.specPath);
  const handler = procedureFor(spec.test)!;
  throwIfAborted(options.signal);
  let provenance: Provenance | undefined;
  let countsRead: Readonly<Record<string, unknown>> | undefined;
  const ctx: RunContext = {
    signal: options.signal,
    onProgress: options.onProgress,
    hasSource: spec.source !== undefined,
    async aggregate(request, levels, needs) {
      if (!spec.source) throw new InputError('$.source: this spec has no source to read', { jsonPath: '$.source' }, 'no-source');
      const aggregate = await readSource(spec.source, request, levels, options, needs);
      provenance = aggregate.provenance;
      return aggregate;
    },
    countsRead(fields) {
      countsRead = fields;
    },
  };
  // The numbers layer names the argument at fault; the saved test's user needs the field (or the source) it came from.
  const origin = (): ArgumentOrigin => ({
    spec,
    places: { ...EVIDENCE_ARGUMENTS, ...handler.arguments },
    fields: [...Object.keys(COMMON_FIELDS), ...Object.keys(handler.fields)],
    dataFields: Object.keys(handler.fields).filter((name) => handler.fields[name].data),
    sourceDescription: provenance?.description,
  });
  const computed = await withArgumentsLocated(origin, () => handler.run(spec, ctx));
  throwIfAborted(options.signal);
  // What the reader noticed (a formula without a stored value, a merged header) goes with the result's notices.
  const withNotices = provenance?.notices?.length ? { ...computed, notices: [...computed.notices, ...provenance.notices] } : computed;
  // Fragility, Bayes factor, equivalence: the sections a count-based test gets beside its p-value.
  const result = withNotices.kind === 'test' ? await withArgumentsLocated(origin, () => withEvidence(withNotices, countsRead ? { ...spec, ...countsRead } : spec)) : withNotices;
  const data: DataFingerprint = provenance
    ? { sha256: provenance.sha256, rows: provenance.rows, columns: [...provenance.columns], description: provenance.description }
    : inlineFingerprint(spec);
  return provenance ? { result, data, provenance } : { result, data };
}

function throwIfAborted(signal: AbortSignal | undefined): void {
  if (signal?.aborted) throw new InputError('cancelled', {}, 'cancelled');
}

/** The reader options a spec's `source` stands for. */
export function intakeOptionsOf(source: SourceSpec, levels?: Pick<CategoryOptions, 'levels' | 'rowLevels' | 'columnLevels'>): IntakeOptions {
  const missing: MissingOptions | undefined =
    source.missing === undefined ? undefined : Array.isArray(source.missing) ? { tokens: source.missing } : (source.missing as MissingOptions);
  const categories: CategoryOptions = {
    ...(source.categories ? { order: source.categories } : {}),
    ...(source.caseFold !== undefined ? { caseFold: source.caseFold } : {}),
    ...(levels?.levels ? { levels: levels.levels } : {}),
    ...(levels?.rowLevels ? { rowLevels: levels.rowLevels } : {}),
    ...(levels?.columnLevels ? { columnLevels: levels.columnLevels } : {}),
  };
  const dialect = {
    ...(source.delimiter !== undefined ? { delimiter: source.delimiter } : {}),
    ...(source.decimal !== undefined ? { decimal: source.decimal } : {}),
    ...(source.encoding !== undefined ? { encoding: source.encoding } : {}),
    ...(source.header !== undefined ? { header: source.header } : {}),
    ...(source.comment !== undefined ? { comment: source.comment } : {}),
  };
  return {
    dialect,
    ...(source.sheet !== undefined ? { sheet: source.sheet } : {}),
    ...(source.range !== undefined ? { range: source.range } : {}),
    ...(missing ? { missing } : {}),
    categories,
    ...(source.path !== undefined ? { file: source.path, description: source.path } : {}),
  };
}

async function readSource(
  source: SourceSpec,
  request: AggregateRequest,
  levels: Pick<CategoryOptions, 'levels' | 'rowLevels' | 'columnLevels'> | undefined,
  options: RunOptions,
  needs: SourceNeeds = {},
): Promise<Aggregate> {
  const intake = { ...intakeOptionsOf(source, levels), ...(needs.values ? { keepValues: true } : {}) };
  const control = { signal: options.signal, onProgress: options.onProgress };
  const reader = source.sql ? SQL_READER : fileReaderFor(source.path!);
  const needed = deliveryNeeded(request, intake);
  if (!reader.delivers.includes(needed)) {
    throw new InputError(`$.source: the ${reader.name} reader cannot deliver ${needed}, which this test needs`, { jsonPath: '$.source' }, 'reader-cannot-deliver');
  }
  if (source.sql) {
    if (!options.readers.aggregateSql) {
      throw new InputError('$.source.sql: database sources are not available here', { jsonPath: '$.source.sql' }, 'sql-unavailable');
    }
    return options.readers.aggregateSql(source, request, intake, control);
  }
  const specFolder = options.specPath ? path.dirname(path.resolve(options.specPath)) : options.allowedRoot;
  if (!specFolder) {
    throw new InputError(
      '$.source.path: a spec read without a file location needs a folder to resolve its source path against',
      { jsonPath: '$.source.path' },
      'no-base-folder',
    );
  }
  const allowedRoot = options.allowedRoot ?? specFolder;
  const file = resolveSourcePath(specFolder, source.path!, { allowedRoot, allowOutsideRoot: options.allowOutsideRoot });
  // The textual check above cannot see symbolic links: each reader checks the real path before it opens the file.
  const checkedIntake = options.allowOutsideRoot ? intake : { ...intake, allowedRoot };
  // The streaming delimited reader comes from the host (its progress display); the others read small files whole.
  const fileReader = fileReaderFor(file);
  return fileReader.hostInjected ? options.readers.aggregateFile(file, request, checkedIntake, control) : fileReader.read(file, request, checkedIntake, control);
}

/** JSON with object keys sorted at every level: the same data always gives the same bytes. */
export function canonicalJson(value: unknown): string {
  if (Array.isArray(value)) return `[${value.map(canonicalJson).join(',')}]`;
  if (value !== null && typeof value === 'object') {
    const entries = Object.keys(value)
      .sort()
      .map((k) => `${JSON.stringify(k)}:${canonicalJson((value as Record<string, unknown>)[k])}`);
    return `{${entries.join(',')}}`;
  }
  return JSON.stringify(value);
}

/** Fingerprint of inline data: the canonical JSON of the fields the handler marks as data. */
export function inlineFingerprint(spec: SpecV1): DataFingerprint {
  const handler = procedureFor(spec.test)!;
  const data: Record<string, unknown> = {};
  let rows = 0;
  for (const [name, f] of Object.entries(handler.fields)) {
    const v = spec[name];
    if (!f.data || v === undefined) continue;
    data[name] = v;
    if (Array.isArray(v)) rows = Math.max(rows, v.length);
    else if (v !== null && typeof v === 'object' && typeof (v as { n?: unknown }).n === 'number') rows = Math.max(rows, (v as { n: number }).n);
    else rows = Math.max(rows, 1);
  }
  return { sha256: sha256Hex(canonicalJson(data)), rows, columns: [], description: 'inline' };
}
