/**
 * What the editor's CodeLens says about a saved test, derived from its procedure's field table: the title the
 * editor lists it under (`planning.label`), its summary, where its data lives (the fields marked as data, or its
 * `source`) and the options it sets, each named by its field in table order. Pure: the host words it (l10n).
 */
import { COMMON_FIELDS, procedureFor } from './procedures/index';

export type LensData =
  /** Data written in the saved test: the data fields present, in table order. */
  | { readonly kind: 'inline'; readonly fields: readonly string[] }
  | { readonly kind: 'file'; readonly path: string; readonly columns: readonly string[] }
  /** `relation`: "schema.table", or undefined for a query of the user's own. */
  | { readonly kind: 'database'; readonly connection: string; readonly relation?: string; readonly columns: readonly string[] }
  /** The procedure reads no data (power, the distribution). */
  | { readonly kind: 'none' };

export interface LensOption {
  readonly field: string;
  /** The value as written, shortened: `0.05`, `exact`, `true`, `3 items`. */
  readonly value: string;
}

export interface SavedTestLens {
  readonly test: string;
  /** The procedure's title in the editor's list of tests (its `planning.label`), else its `test` name. */
  readonly procedure: string;
  /** The saved test's own `title`, when it has one. */
  readonly title?: string;
  /** The procedure's one-sentence summary from its table. */
  readonly summary: string;
  readonly data: LensData;
  /** Options the saved test sets, in the order of its field table (common fields first); at most MAX_OPTIONS. */
  readonly options: readonly LensOption[];
  /** Options set beyond those listed. */
  readonly moreOptions: number;
}

export const MAX_OPTIONS = 5;
const MAX_VALUE = 24;
/** Common fields that are not options: they name or describe the test, or hold the recorded result. */
const NOT_OPTIONS = new Set(['$schema', 'version', 'test', 'title', 'description', 'recorded']);

function shortValue(value: unknown): string {
  if (Array.isArray(value)) return `${value.length} item${value.length === 1 ? '' : 's'}`;
  if (value !== null && typeof value === 'object') return '{…}';
  const text = typeof value === 'string' ? value : JSON.stringify(value);
  return text.length > MAX_VALUE ? `${text.slice(0, MAX_VALUE - 1)}…` : text;
}

const strings = (v: unknown): string[] => (Array.isArray(v) ? v.filter((x): x is string => typeof x === 'string') : []);

/** The lens for a parsed saved test; undefined when it names no known procedure (the run lens then reports why). */
export function savedTestLens(value: unknown): SavedTestLens | undefined {
  if (value === null || typeof value !== 'object' || Array.isArray(value)) return undefined;
  const spec = value as Readonly<Record<string, unknown>>;
  const handler = typeof spec.test === 'string' ? procedureFor(spec.test) : undefined;
  if (!handler) return undefined;
  const fields = { ...COMMON_FIELDS, ...handler.fields };
  const source = spec.source !== null && typeof spec.source === 'object' ? (spec.source as Readonly<Record<string, unknown>>) : undefined;
  const inline = Object.keys(handler.fields).filter((name) => handler.fields[name].data && spec[name] !== undefined);
  let data: LensData;
  const sql = source?.sql !== null && typeof source?.sql === 'object' ? (source.sql as Readonly<Record<string, unknown>>) : undefined;
  if (sql) data = { kind: 'database', connection: String(sql.connection ?? ''), ...(typeof sql.table === 'string' ? { relation: sql.table } : {}), columns: strings(source?.columns) };
  else if (typeof source?.path === 'string') data = { kind: 'file', path: source.path, columns: strings(source.columns) };
  else if (inline.length > 0 || handler.fields.source) data = { kind: 'inline', fields: inline };
  else data = { kind: 'none' };
  const set = Object.keys(fields).filter((name) => name !== 'source' && !NOT_OPTIONS.has(name) && !fields[name].data && spec[name] !== undefined);
  return {
    test: handler.test,
    procedure: handler.planning?.label ?? handler.test,
    ...(typeof spec.title === 'string' && spec.title.trim() !== '' ? { title: spec.title } : {}),
    summary: handler.summary,
    data,
    options: set.slice(0, MAX_OPTIONS).map((field) => ({ field, value: shortValue(spec[field]) })),
    moreOptions: Math.max(0, set.length - MAX_OPTIONS),
  };
}
