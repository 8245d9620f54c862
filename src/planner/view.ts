/**
 * What the planner sees of an offer: its columns with their profiles, or data already counted, once the shape
 * is inferred (with notes that say what was inferred and why), and the facts a procedure's options default from.
 */
import { aggregateRecords } from '../data/aggregate';
import type { Records } from '../data/records';
import type { CategoryCounts, CountTable } from '../data/types';
import type { Offer } from './offer';
import type { PlanSettings } from './plan';
import { text, verbatim, type Shown } from './questions';
import { describeColumn, inferShape, isCategorical, isMeasurement, profileColumns, type ColumnProfile, type Shape } from './profile';

/** A column as the planner sees it, from a file's records or a database catalogue. */
export interface ColumnInfo {
  readonly name: string;
  readonly categorical: boolean;
  readonly measurement: boolean;
  readonly detail: Shown;
  readonly description: Shown;
  readonly profile?: ColumnProfile;
}

/** The data, once its shape is known. */
export type View =
  | { readonly form: 'table'; readonly table: CountTable }
  | { readonly form: 'categories'; readonly counts: CategoryCounts; readonly expectation?: Readonly<Record<string, unknown>>; readonly labelColumn?: string; readonly countColumn?: string }
  | { readonly form: 'values'; readonly values: readonly number[] }
  | { readonly form: 'columns'; readonly columns: readonly ColumnInfo[]; readonly shape: Shape; readonly records?: Records }
  | { readonly form: 'nothing' };

/** A column to choose: its name in words ("the rows", from the procedure's table) and the kind of column it takes. */
export type Role = { readonly name: Shown; readonly kind: 'categorical' | 'measurement' };

export function columnInfo(p: ColumnProfile, weight: string | undefined): ColumnInfo {
  return {
    name: p.name,
    categorical: isCategorical(p) && p.name !== weight,
    measurement: isMeasurement(p),
    description: p.stray ? text('numbers, with stray cells') : p.numeric ? text('numbers') : text('categories'),
    detail: p.name === weight ? text('frequency weight: {0}', describeColumn(p)) : describeColumn(p),
    profile: p,
  };
}

/** The offer read into a view: its shape inferred, with notes saying what was inferred and why. */
export function viewOf(offer: Offer, settings: PlanSettings, notes: Shown[]): View {
  switch (offer.kind) {
    case 'nothing':
      return { form: 'nothing' };
    case 'counted': {
      const d = offer.data;
      if (d.kind === 'table') return { form: 'table', table: d.table };
      if (d.kind === 'values') return { form: 'values', values: d.values };
      const expectation = d.proportions ? { proportions: d.proportions } : d.ratios ? { ratios: d.ratios } : d.expected ? { expected: d.expected } : undefined;
      return { form: 'categories', counts: d.counts, expectation };
    }
    case 'catalogue':
      return {
        form: 'columns',
        shape: { kind: 'raw' },
        columns: offer.columns.map((c) => ({ name: c.name, categorical: true, measurement: c.numeric, description: verbatim(c.type), detail: c.numeric ? text('numbers (server type)') : text('categories (server type)') })),
      };
    case 'records': {
      const records = offer.records;
      const profiles = profileColumns(records, settings.missingValues);
      const shape = inferShape(records, profiles);
      if (shape.kind !== 'raw') notes.push(shape.reason);
      if (shape.kind === 'counted-table') {
        const aggregate = aggregateRecords(records, { kind: 'counted-table' }, { description: offer.description });
        if (aggregate.kind === 'table') return { form: 'table', table: aggregate.table };
      }
      if (shape.kind === 'category-counts') {
        const aggregate = aggregateRecords(records, { kind: 'categories', column: shape.labelColumn, weight: shape.countColumn }, { description: offer.description });
        if (aggregate.kind === 'categories') return { form: 'categories', counts: aggregate.counts, labelColumn: shape.labelColumn, countColumn: shape.countColumn };
      }
      const weight = shape.kind === 'long-counts' ? shape.weightColumn : undefined;
      return { form: 'columns', shape, records, columns: profiles.map((p) => columnInfo(p, weight)) };
    }
  }
}

export const sum = (xs: readonly number[]): number => xs.reduce((a, b) => a + b, 0);

export function describeView(view: View): Shown {
  switch (view.form) {
    case 'table':
      return text('a {0}×{1} table of counts, N = {2}', view.table.rowLabels.length, view.table.columnLabels.length, sum(view.table.counts.map((r) => sum(r))).toLocaleString('en-US'));
    case 'categories':
      return text('{0} category counts, N = {1}', view.counts.labels.length, sum(view.counts.counts).toLocaleString('en-US'));
    case 'values':
      return text('{0} values', view.values.length);
    case 'columns':
      return view.shape.kind === 'long-counts' ? text('{0} columns, weighted by `{1}`', view.columns.length, view.shape.weightColumn) : text('{0} columns', view.columns.length);
    case 'nothing':
      return text('no data');
  }
}

/** What the planner knows about the data a test will see, for defaults of its options. */
export interface DataFacts {
  readonly fields: Record<string, unknown>;
  /** Levels of a goodness-of-fit variable, when known. */
  readonly levels?: readonly string[];
  /** The table's size, when known. */
  readonly rows?: number;
  readonly columns?: number;
  readonly n?: number;
  /** The expectation is part of the data already (a JSON block with proportions). */
  readonly hasExpectation?: boolean;
  /** Variable name for prompts ("σ0 in the units of `weight_g`"). */
  readonly variable?: string;
}

