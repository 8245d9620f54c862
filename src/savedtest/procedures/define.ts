/** The contract of a procedure handler and the fields every saved test shares; the registry is ./index.ts. */
import type { Result } from '../../stats/result';
import { any, field, num, str, type Field, type FieldsValue, type SpecProblem } from '../fields';
import type { ArgumentPlaces } from '../arguments';
import type { RunContext, SpecV1 } from '../types';
import { ALPHA } from './shared';

/** The shapes of data a procedure accepts, as the planner (src/planner) sees a source. */
export type DataShape =
  /** An r×c table of counts (counted in a file, a selection, a JSON block or a cell). */
  | 'counted-table'
  /** A k×k table: the same categories as rows and columns. */
  | 'square-table'
  /** Counts of the levels of one categorical variable. */
  | 'category-counts'
  /** A list of numbers. */
  | 'values'
  /** Records: one categorical column per role (`roles`). */
  | 'categorical-columns'
  /** Records: one numeric column. */
  | 'numeric-column'
  /** No data needed (every source, and the palette). */
  | 'anything';

/** A field the planner asks for when it is missing, in the words of its field table. */
export interface FieldQuestion {
  readonly field: string;
  /** Short title of the question; the prompt is the field's description. */
  readonly title: string;
  /** Asked only when this holds of the fields planned so far. */
  readonly when?: (spec: Readonly<Record<string, unknown>>) => boolean;
  /** A field that may be given instead of this one: the user first chooses which of the two to give. */
  readonly orElse?: string;
  /** With `orElse`: the choice is asked at this point, the chosen field's value after the other questions. */
  readonly valueLater?: boolean;
  /** The value offered when the field has no default and nothing was answered before. */
  readonly preset?: unknown;
  /** Labels for the values of an enumerated field. */
  readonly choiceLabels?: Readonly<Record<string, string>>;
}

/** How the editor offers a procedure: what it is called, which data it takes, what it asks. */
export interface Planning {
  readonly label: string;
  readonly detail: string;
  readonly accepts: readonly DataShape[];
  /** Names of the columns to choose for `categorical-columns` ("the rows", "the columns"). */
  readonly roles?: readonly string[];
  /** The same procedure with a field preset, offered as its own line (a p-value method). */
  readonly variants?: readonly { readonly label: string; readonly detail: string; readonly preset: Readonly<Record<string, unknown>> }[];
  /** Fields asked, in order, when neither given nor fixed by the data. */
  readonly questions?: readonly FieldQuestion[];
}

export interface ProcedureHandler {
  readonly test: string;
  readonly summary: string;
  /** How the editor's planner offers it; absent: only by writing a saved test. */
  readonly planning?: Planning;
  readonly fields: Readonly<Record<string, Field>>;
  /** Arguments of the numbers layer that come from a field of another name (default: the field of the same name). */
  readonly arguments?: ArgumentPlaces;
  validate(spec: SpecV1, path: string): readonly SpecProblem[];
  run(spec: SpecV1, ctx: RunContext): Promise<Result>;
}

/** The fields every saved test has, whatever its procedure. */
export type CommonSpec = {
  readonly version?: 1;
  readonly test: string;
  readonly title?: string;
  readonly description?: string;
  readonly alpha?: number;
  readonly recorded?: unknown;
};

/** The TypeScript type of a saved test of the procedure whose field table is F: derived from the table. */
export type SpecOf<F> = CommonSpec & FieldsValue<F>;

/** A handler written against its own field table: `validate` and `run` see the typed saved test. */
export interface TypedProcedure<F extends Readonly<Record<string, Field>>> extends Omit<ProcedureHandler, 'fields' | 'validate' | 'run'> {
  readonly fields: F;
  validate(spec: SpecOf<F>, path: string): readonly SpecProblem[];
  run(spec: SpecOf<F>, ctx: RunContext): Promise<Result>;
}

/**
 * Registers a handler typed by its field table. The one cast between the validated JSON value and the typed saved
 * test is here: `validate` runs only after every field was checked against the same table.
 */
export function defineProcedure<F extends Readonly<Record<string, Field>>>(handler: TypedProcedure<F>): ProcedureHandler {
  return handler as unknown as ProcedureHandler;
}

/** Fields every spec may have, whatever its test. */
export const COMMON_FIELDS: Readonly<Record<string, Field>> = {
  $schema: field(str(), 'The JSON Schema of this file, for editors that do not know the *.countercheck.json association.'),
  version: field(num({ integer: true, min: 1, max: 1 }), 'Spec format version. This build reads version 1.'),
  test: field(str(), 'Which procedure to run.'),
  title: field(str(), 'A short name for people, shown above the result.'),
  description: field(str(), 'What this test is for; kept with the spec.'),
  alpha: ALPHA,
  recorded: field(any, 'The result seen when this spec was saved (written by `countercheck run --record` or the editor). Compared on every re-run.'),
};
