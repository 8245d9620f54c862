// Loading the reference fixtures (test/fixtures/<reference>/, written by scripts/fixtures/, never by our code),
// and a helper for the refusals the pure layers throw.
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { InputError, isInstance } from '../../src/errors';
import type { FixtureNumber } from './tolerance';

const fixtures = join(__dirname, '..', 'fixtures');

/** test/fixtures/<reference>/<name> with its `versions` and `cases`. */
export function loadFixture<T>(reference: string, name: string): { versions: Record<string, string>; cases: T[] } {
  return JSON.parse(readFileSync(join(fixtures, reference, name), 'utf8')) as { versions: Record<string, string>; cases: T[] };
}

/** test/fixtures/<reference>/<name>.json as a whole. */
export function fixture<T>(reference: string, name: string): T {
  return JSON.parse(readFileSync(join(fixtures, reference, `${name}.json`), 'utf8')) as T;
}

/** Runs fn, which must throw an InputError, and returns it. */
export function errorOf(fn: () => unknown): InputError {
  try {
    fn();
  } catch (e) {
    assert.ok(isInstance(e, InputError), `expected an InputError, got ${String(e)}`);
    return e;
  }
  assert.fail('expected an InputError, but nothing was thrown');
}

/** The statistics the fixture script recomputes at 40 digits in mpmath. */
export interface HighPrecision {
  pearson: FixtureNumber;
  pearsonLog10: FixtureNumber;
  likelihoodRatio: FixtureNumber;
  likelihoodRatioLog10: FixtureNumber;
  cressieRead: { lambda: number; statistic: FixtureNumber }[];
}
