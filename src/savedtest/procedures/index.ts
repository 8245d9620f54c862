/**
 * The registry of procedures a saved spec can name in its `"test"` field.
 *
 * ## Adding a procedure (the handler contract)
 *
 * Write one file in this folder that exports `defineProcedure({ … })` (imported from ./define), and add it to `PROCEDURES` below.
 * `validate` and `run` then receive the saved test typed by the file's own field table (`SpecOf<fields>`):
 * an enumerated field arrives as its union of strings, an array of counts as `readonly number[]`, no casts.
 *
 * - `test`: the value of `"test"` in the spec, e.g. "paired". Stable: users' pipelines rely on it.
 * - `summary`: one sentence; it becomes the description of this test in the JSON Schema.
 * - `fields`: every field this test accepts besides the common ones (`COMMON_FIELDS`: version, test,
 *   title, description, alpha, recorded). Each is a `Field` (src/savedtest/fields.ts): a type, a description for
 *   hovers, an optional default (`withDefault`, shown in the schema and pre-filled in questions), and `data: true` when the field holds data (the canonical JSON of the data fields is the
 *   fingerprint that tells a reviewer whether inline data changed). Reuse the shared fields in ./shared.ts
 *   (ALPHA, CONFIDENCE, STATISTIC, METHOD, `sourceField(...)`…) so an option means the same in every test.
 *   Type checking, unknown-field errors and the JSON Schema all come from this table; the unit test
 *   test/unit/savedtest/schema.test.ts fails until `npm run schema` has rewritten schemas/countercheck.schema.json.
 * - `planning`: how the editor offers it — a label and a detail for the list of tests, the data shapes it
 *   accepts (`DataShape`), the column roles to choose, variants with a preset field (a p-value method), and the
 *   fields to ask when missing (each with a title; the prompt is the field's description and the accepted
 *   values come from its type). The planner in src/planner reads this; it needs no change for a new procedure.
 * - `validate(spec, path)`: checks that need more than one field (exactly one data form, matching lengths,
 *   options that only make sense together). Called only after every field has the right type. Returns every
 *   problem found, each with its JSON path built from `path` (usually "$"). Must not throw or do I/O.
 * - `run(spec, ctx)`: computes the result. Read inline data from the spec, or call
 *   `ctx.aggregate(request, levels)` for the spec's `source` (paths are resolved and checked for you, and the
 *   data fingerprint is kept for the recorded result). Throw `InputError` with a `jsonPath` for bad data.
 *   Pass `ctx.signal` on to anything long. Return a `TestResult`, `DistributionResult` or `PowerResult`.
 * - `arguments` (optional): the errors of src/stats name a function argument, not a field; `runSpec` points
 *   them at the field of the same name (or at `source` for data read from it). List here the arguments that come
 *   from a field of another name, e.g. `{ labels: 'categories' }` (src/savedtest/arguments.ts).
 *
 * Nothing else needs to change: validation, the schema, the command line (`run`, `check`, `--record`),
 * living report blocks and the reports all work from the handler.
 */
import type { ProcedureHandler } from './define';
import { distributionProcedure } from './distribution';
import { goodnessOfFitProcedure } from './goodness-of-fit';
import { independenceProcedure } from './independence';
import { varianceProcedure } from './variance';
import { pairedProcedure } from './paired';
import { stratifiedProcedure } from './stratified';
import { trendProcedure } from './trend';
import { powerProcedure } from './power';
import { distributionFitProcedure } from './distfit';
import { postHocProcedure } from './posthoc';

export * from './define';

export const PROCEDURES: readonly ProcedureHandler[] = [
  varianceProcedure,
  goodnessOfFitProcedure,
  independenceProcedure,
  distributionProcedure,
  pairedProcedure,
  stratifiedProcedure,
  trendProcedure,
  powerProcedure,
  distributionFitProcedure,
  postHocProcedure,
];

export function procedureFor(test: string): ProcedureHandler | undefined {
  return PROCEDURES.find((p) => p.test === test);
}

export const TEST_NAMES: readonly string[] = PROCEDURES.map((p) => p.test);
