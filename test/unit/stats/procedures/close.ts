// Tolerance checks for the procedure tests: a failure prints the case, expected, got, Δ and the tolerance.
import { AssertionError, strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { InputError, isInstance } from '../../../../src/errors';

/** A fixture number: JSON has no Infinity or NaN, so the fixture scripts write them as strings. */
export type FixtureNumber = number | 'Infinity' | '-Infinity' | 'NaN';

export function num(x: FixtureNumber): number {
  return typeof x === 'number' ? x : x === 'Infinity' ? Infinity : x === '-Infinity' ? -Infinity : NaN;
}

export interface Tolerance {
  /** Relative tolerance. */
  readonly rel: number;
  /** Absolute floor, for expected values near 0. Default 0. */
  readonly abs?: number;
}

export function assertClose(got: number, expected: FixtureNumber, tolerance: Tolerance, what: string): void {
  const want = num(expected);
  if (Number.isNaN(want) && Number.isNaN(got)) return;
  if (!Number.isFinite(want) && got === want) return;
  const delta = Math.abs(got - want);
  const allowed = Math.max(tolerance.rel * Math.abs(want), tolerance.abs ?? 0);
  if (!(delta <= allowed)) {
    throw new AssertionError({
      message: `${what}\n  expected ${want}\n  got      ${got}\n  Δ        ${delta}\n  tolerance ${allowed} (rel ${tolerance.rel}, abs ${tolerance.abs ?? 0})`,
      actual: got,
      expected: want,
      operator: 'close',
    });
  }
}

/** Loads test/fixtures/<reference>/<name>.json. */
export function loadFixture<T>(reference: string, name: string): { versions: Record<string, string>; cases: T[] } {
  const path = join(__dirname, '..', '..', '..', 'fixtures', reference, name);
  return JSON.parse(readFileSync(path, 'utf8')) as { versions: Record<string, string>; cases: T[] };
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
