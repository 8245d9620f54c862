/**
 * Review and reproducibility: what a saved spec records about the result that was seen, how a re-run is
 * compared with it (reproduced / data changed / result differs / cannot run), and how the record is
 * written back into the spec's text without disturbing anything else in the file. Pure: the clock and the
 * tool version are passed in.
 */
import { applyEdits, modify } from 'jsonc-parser';
import type { Result } from '../stats/result';
import { DEFAULT_FRAGILITY_THRESHOLD, fragileConclusion, type FragileConclusion } from './family';
import { childPath, lineColumnOf, maskByteOrderMark, type LocatedJson } from './json-text';
import type { DataFingerprint, SpecRun } from './types';

/** Numbers are equal when |a − b| ≤ relative · max(|a|, |b|) + absolute. */
export const TOLERANCE = { relative: 1e-9, absolute: 1e-12 } as const;
export const TOLERANCE_TEXT = `numbers agree within a relative difference of ${TOLERANCE.relative} (absolute ${TOLERANCE.absolute} near zero); p-values are also compared on the log10 scale`;

/** The numbers of a result that a reviewer compares. */
export interface RecordedNumbers {
  readonly test: string;
  readonly statistic: number | null;
  readonly df: number | null;
  readonly n: number | null;
  readonly pValue: number | null;
  readonly pValueLog10: number | null;
  readonly effectSize?: { readonly id: string; readonly name: string; readonly value: number };
  readonly alpha?: number;
  readonly significant?: boolean;
  readonly conclusion?: string;
  /** Distribution queries: tail probabilities (log10) and critical values. */
  readonly points?: readonly { readonly x: number; readonly upperLog10: number | null; readonly lowerLog10: number | null }[];
  readonly critical?: readonly { readonly p: number; readonly lower: number; readonly upper: number }[];
  /** Power questions. */
  readonly power?: number;
}

export interface RecordedResult {
  /** "countercheck 0.1.0" */
  readonly tool: string;
  /** ISO 8601 time of recording. */
  readonly recordedAt: string;
  readonly data: DataFingerprint;
  readonly result: RecordedNumbers;
}

const finiteOrNull = (x: number): number | null => (Number.isFinite(x) ? x : null);
const log10Of = (p: { value: number; log10: number }): number | null => finiteOrNull(Number.isFinite(p.log10) ? p.log10 : Math.log10(p.value));

export function recordedNumbers(result: Result): RecordedNumbers {
  switch (result.kind) {
    case 'test': {
      const e = result.effectSizes[0];
      return {
        test: result.test,
        statistic: finiteOrNull(result.statistic),
        df: result.df,
        n: result.n,
        pValue: result.pValue.value,
        pValueLog10: log10Of(result.pValue),
        ...(e ? { effectSize: { id: e.id, name: e.name, value: e.value } } : {}),
        alpha: result.alpha,
        significant: result.significant,
        conclusion: result.conclusion,
      };
    }
    case 'distribution': {
      const first = result.points[0];
      return {
        test: 'distribution',
        statistic: first ? first.x : null,
        df: result.df,
        n: null,
        pValue: first ? first.upper.value : null,
        pValueLog10: first ? log10Of(first.upper) : null,
        points: result.points.map((p) => ({ x: p.x, upperLog10: log10Of(p.upper), lowerLog10: log10Of(p.lower) })),
        critical: result.critical.map((c) => ({ p: c.p, lower: c.lower, upper: c.upper })),
      };
    }
    case 'power':
      return { test: 'power', statistic: null, df: result.df, n: result.n, pValue: null, pValueLog10: null, alpha: result.alpha, power: result.power };
  }
}

export function makeRecord(run: SpecRun, tool: string, now: Date): RecordedResult {
  return { tool, recordedAt: now.toISOString(), data: run.data, result: recordedNumbers(run.result) };
}

/** The field name of a difference between a report's written result and its re-run (`check` on a report). */
export const WRITTEN_RESULT = 'result written in the report';

export type ReviewStatus = 'reproduced' | 'data-changed' | 'result-differs' | 'cannot-run';

export interface Difference {
  /** "statistic", "effectSize.value", "points[0].upperLog10", "significant"… */
  readonly field: string;
  readonly recorded: unknown;
  readonly current: unknown;
}

export interface Review {
  readonly status: ReviewStatus;
  /** Why it cannot run (missing file, bad spec, no recorded result…). */
  readonly reason?: string;
  readonly recorded?: RecordedResult;
  /** What would be recorded now (time and tool of this run). */
  readonly current?: RecordedResult;
  readonly differences: readonly Difference[];
  /** Data changed or result differs: whether the conclusion at α changed between significant and not. */
  readonly conclusionFlipped?: boolean;
  readonly tolerance: string;
  /** The recorded conclusion is significant and the re-run's fragility index is at most the threshold. */
  readonly fragile?: FragileConclusion;
}

export function cannotRun(reason: string): Review {
  return { status: 'cannot-run', reason, differences: [], tolerance: TOLERANCE_TEXT };
}

function close(a: number, b: number): boolean {
  if (a === b) return true;
  return Math.abs(a - b) <= TOLERANCE.relative * Math.max(Math.abs(a), Math.abs(b)) + TOLERANCE.absolute;
}

/** Every field (recursively) where the two records differ beyond the tolerance; strings other than the test name are ignored. */
export function numberDifferences(recorded: unknown, current: unknown, path = ''): Difference[] {
  if (typeof recorded === 'number' && typeof current === 'number') return close(recorded, current) ? [] : [{ field: path, recorded, current }];
  if (Array.isArray(recorded) && Array.isArray(current)) {
    if (recorded.length !== current.length) return [{ field: `${path}.length`.replace(/^\./, ''), recorded: recorded.length, current: current.length }];
    return recorded.flatMap((r, i) => numberDifferences(r, current[i], `${path}[${i}]`));
  }
  if (recorded && current && typeof recorded === 'object' && typeof current === 'object') {
    const keys = new Set([...Object.keys(recorded), ...Object.keys(current)]);
    return [...keys].flatMap((k) => {
      if (k === 'conclusion' || k === 'name') return [];
      return numberDifferences((recorded as Record<string, unknown>)[k], (current as Record<string, unknown>)[k], path ? `${path}.${k}` : k);
    });
  }
  if (typeof recorded === 'string' && typeof current === 'string' && path !== 'test') return [];
  return recorded === current ? [] : [{ field: path, recorded, current }];
}

/** Checks that a spec's `recorded` field has the shape this module writes; returns a problem or the record. */
export function readRecorded(value: unknown): RecordedResult | string {
  if (value === undefined) return 'no recorded result in the spec; run `countercheck run --record` (or save from the panel) first';
  const v = value as Partial<RecordedResult> | null;
  if (!v || typeof v !== 'object') return '$.recorded: expected an object';
  if (!v.data || typeof v.data !== 'object' || typeof v.data.sha256 !== 'string') return '$.recorded.data.sha256: expected the data fingerprint (a string)';
  if (!v.result || typeof v.result !== 'object' || typeof v.result.test !== 'string') return '$.recorded.result: expected the recorded numbers';
  return v as RecordedResult;
}

/** Compares a re-run with the spec's recorded result. */
export function compareWithRecord(recordedValue: unknown, run: SpecRun, tool: string, now: Date, fragilityThreshold = DEFAULT_FRAGILITY_THRESHOLD): Review {
  const recorded = readRecorded(recordedValue);
  if (typeof recorded === 'string') return cannotRun(recorded);
  const current = makeRecord(run, tool, now);
  const differences = numberDifferences(recorded.result, current.result);
  const flipped =
    typeof recorded.result.significant === 'boolean' && typeof current.result.significant === 'boolean'
      ? recorded.result.significant !== current.result.significant
      : undefined;
  const fragile = fragileConclusion(recorded.result.significant, run.result, fragilityThreshold);
  const base = { recorded, current, differences, tolerance: TOLERANCE_TEXT, ...(flipped !== undefined ? { conclusionFlipped: flipped } : {}), ...(fragile ? { fragile } : {}) };
  if (recorded.data.sha256 !== current.data.sha256) return { status: 'data-changed', ...base };
  return { status: differences.length === 0 ? 'reproduced' : 'result-differs', ...base };
}

export const STATUS_LABEL: Readonly<Record<ReviewStatus, string>> = {
  reproduced: 'reproduced',
  'data-changed': 'data changed',
  'result-differs': 'result differs',
  'cannot-run': 'cannot run',
};

const show = (x: unknown): string => (typeof x === 'number' ? String(Number(x.toPrecision(8))) : JSON.stringify(x));

/** A few lines for people: the status and what changed. */
export function describeReview(review: Review, name: string): string {
  const head = `${STATUS_LABEL[review.status]}: ${name}`;
  if (review.status === 'cannot-run') return `${head}\n  ${review.reason}`;
  // A block of a report without a recorded result is compared only with what the report shows.
  const r = review.recorded;
  const c = review.current!;
  const lines = [head];
  const stat = (x: RecordedResult): string => (x.result.statistic === null ? 'n/a' : show(x.result.statistic));
  if (review.status === 'reproduced') {
    lines.push(`  same data (sha256 ${c.data.sha256.slice(0, 12)}…, ${c.data.rows} rows); statistic ${stat(c)}, p ${show(c.result.pValue)}`);
  } else if (review.status === 'data-changed' && r) {
    lines.push(`  data fingerprint differs: recorded ${r.data.rows} rows (sha256 ${r.data.sha256.slice(0, 12)}…), now ${c.data.rows} rows (sha256 ${c.data.sha256.slice(0, 12)}…)`);
    lines.push(`  n ${show(r.result.n)} → ${show(c.result.n)}; statistic ${stat(r)} → ${stat(c)}; p ${show(r.result.pValue)} → ${show(c.result.pValue)}`);
  } else {
    const numbers = review.differences.filter((d) => !d.field.startsWith(WRITTEN_RESULT));
    if (numbers.length > 0) lines.push(`  same data, different numbers (a regression; ${review.tolerance}):`);
    for (const d of numbers) lines.push(`    ${d.field}: recorded ${show(d.recorded)}, now ${show(d.current)}`);
  }
  const written = review.differences.filter((d) => d.field.startsWith(WRITTEN_RESULT));
  if (written.length > 0) lines.push(`  the result the report shows differs from the re-run (statistic ${stat(c)}, p ${show(c.result.pValue)}):`);
  for (const d of written) lines.push(`    ${d.field}: written ${show(d.recorded)}, now ${show(d.current)}`);
  if (r && review.conclusionFlipped !== undefined && review.status !== 'reproduced') {
    const alpha = c.result.alpha ?? r.result.alpha;
    const word = (s: boolean | undefined): string => (s ? 'significant' : 'not significant');
    lines.push(
      review.conclusionFlipped
        ? `  conclusion FLIPPED at α = ${alpha}: was ${word(r.result.significant)}, now ${word(c.result.significant)}`
        : `  conclusion unchanged at α = ${alpha} (${word(c.result.significant)})`,
    );
  }
  if (review.fragile) lines.push(`  ${review.fragile.message}`);
  lines.push(r ? `  recorded ${r.recordedAt} by ${r.tool}` : '  compared with the result written in the report');
  return lines.join('\n');
}

/** Machine output for one reviewed spec. */
export function reviewJson(review: Review, file: string): Record<string, unknown> {
  return {
    file,
    status: review.status,
    ...(review.reason ? { reason: review.reason } : {}),
    ...(review.conclusionFlipped !== undefined ? { conclusionFlipped: review.conclusionFlipped } : {}),
    ...(review.fragile ? { fragile: review.fragile } : {}),
    tolerance: TOLERANCE,
    differences: review.differences,
    ...(review.recorded ? { recorded: review.recorded } : {}),
    ...(review.current ? { current: { data: review.current.data, result: review.current.result } } : {}),
  };
}

/** The kinds of change a pipeline may choose to fail on (`check --fail-on`). */
export type ChangeKind = 'result' | 'conclusion' | 'data';
export const ALL_CHANGES: ReadonlySet<ChangeKind> = new Set<ChangeKind>(['result', 'conclusion', 'data']);

/** What changed since the record: the data's fingerprint, the numbers on the same data, the conclusion at α. */
export function changesOf(review: Review): ChangeKind[] {
  const kinds: ChangeKind[] = [];
  if (review.status === 'data-changed') kinds.push('data');
  if (review.status === 'result-differs') kinds.push('result');
  if (review.conclusionFlipped === true && review.status !== 'reproduced') kinds.push('conclusion');
  return kinds;
}

/** Whether a review fails a check that fails on `failOn` (a test that cannot run always fails). */
export function reviewFails(review: Review, failOn: ReadonlySet<ChangeKind> = ALL_CHANGES): boolean {
  return review.status === 'cannot-run' || changesOf(review).some((k) => failOn.has(k));
}

/** Exit code for a pipeline: 0 nothing failing, 1 some change named in `failOn`, 2 some cannot run. */
export function reviewExitCode(reviews: readonly Review[], failOn: ReadonlySet<ChangeKind> = ALL_CHANGES): number {
  if (reviews.some((r) => r.status === 'cannot-run')) return 2;
  if (reviews.some((r) => reviewFails(r, failOn))) return 1;
  return 0;
}

/**
 * Writes `recorded` into the spec's text: replaces the value of an existing top-level "recorded" member,
 * or adds the member at the end of the root object. jsonc-parser's `modify` decides where the member goes
 * and which comma it needs, as one edit; every byte outside that edit stays as it was. Only the edit's text
 * is ours: the record serialised with the file's own indentation and line ending (the library's formatter
 * would also reformat the neighbouring member's line).
 */
export function writeRecordedInto(located: LocatedJson, recorded: RecordedResult): string {
  const text = located.text;
  const newline = text.includes('\r\n') ? '\r\n' : '\n';
  const memberIndent = detectMemberIndent(located);
  const serialise = (indent: string | undefined): string => {
    if (indent === undefined) return JSON.stringify(recorded);
    const unit = indentUnitOf(indent);
    return JSON.stringify(recorded, null, unit).split('\n').join(newline + indent);
  };
  const edits = modify(maskByteOrderMark(text), ['recorded'], 0, {});
  if (edits.length !== 1) throw new Error(`internal: expected one edit to write "recorded", got ${edits.length}`);
  const [edit] = edits;
  let content: string;
  if (edit.length > 0) {
    // Replacing the earlier record's value.
    const existing = located.spans.get(childPath('$', 'recorded'));
    content = serialise(memberIndent === undefined ? undefined : indentOfLine(text, existing?.keyStart ?? edit.offset));
  } else if (memberIndent === undefined) {
    content = `${edit.content.startsWith(',') ? ',' : ''}"recorded":${serialise(undefined)}`;
  } else if (edit.content.startsWith(',')) {
    content = `,${newline}${memberIndent}"recorded": ${serialise(memberIndent)}`;
  } else {
    // An empty root object: the member on its own line, the closing brace on the next.
    const closing = text.indexOf('}', edit.offset);
    const closingIndent = indentOfLine(text, closing);
    const between = text.slice(edit.offset, closing);
    content = `${newline}${memberIndent}"recorded": ${serialise(memberIndent)}${between.includes('\n') ? '' : newline + closingIndent}`;
  }
  return applyEdits(text, [{ ...edit, content }]);
}

/** Indentation of the root object's members, or undefined when the spec is written on one line. */
function detectMemberIndent(located: LocatedJson): string | undefined {
  const first = [...located.spans.entries()].find(([p]) => /^\$\.[A-Za-z_$][\w$]*$/.test(p) || /^\$\["/.test(p));
  if (!first || first[1].keyStart === undefined) return '  ';
  const { line } = lineColumnOf(located.text, first[1].keyStart);
  const rootLine = lineColumnOf(located.text, located.spans.get('$')!.start).line;
  if (line === rootLine) return undefined;
  return indentOfLine(located.text, first[1].keyStart);
}

function indentOfLine(text: string, offset: number): string {
  const lineStart = text.lastIndexOf('\n', offset - 1) + 1;
  return /^[ \t]*/.exec(text.slice(lineStart))![0];
}

function indentUnitOf(indent: string): string {
  if (indent.startsWith('\t')) return '\t';
  return indent.length > 0 ? indent : '  ';
}
