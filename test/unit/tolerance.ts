// The one tolerance check of the unit tests: |got − expected| ≤ max(rel · |expected|, abs), and on failure a message
// with the case, the expected value, the value obtained, Δ and the tolerance. The call forms below differ only in
// how their callers name the case.
import { AssertionError } from 'node:assert';

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

/** Relative difference |got − expected| / |expected| (absolute when expected is 0 or not finite). */
export function relativeError(got: number, expected: number): number {
  if (got === expected) return 0;
  if (expected === 0 || !Number.isFinite(expected)) return Math.abs(got - expected);
  return Math.abs(got - expected) / Math.abs(expected);
}

/** The check itself. NaN equals NaN and an infinity equals itself (fixtures record both). */
export function assertClose(got: number, expected: FixtureNumber, tolerance: Tolerance, what: string): void {
  const want = num(expected);
  if (Number.isNaN(want) && Number.isNaN(got)) return;
  if (got === want) return;
  const delta = Math.abs(got - want);
  const allowed = Math.max(tolerance.rel * Math.abs(want), tolerance.abs ?? 0);
  if (!(delta <= allowed)) {
    throw new AssertionError({
      message: `${what}\n  expected  ${want}\n  got       ${got}\n  Δ         ${got - want} (relative ${relativeError(got, want).toExponential(3)})\n  tolerance ${allowed} (rel ${tolerance.rel}, abs ${tolerance.abs ?? 0})`,
      actual: got,
      expected: want,
      operator: 'close',
    });
  }
}

/** Relative tolerance, the case named by its input. */
export function assertRelative(got: number, expected: number, tol: number, input: string): void {
  // An expected 0 has no relative scale: the tolerance is then absolute.
  assertClose(got, expected, { rel: tol, abs: expected === 0 ? tol : 0 }, input);
}

/** Absolute tolerance, the case named by its input. */
export function assertAbsolute(got: number, expected: number, tol: number, input: string): void {
  assertClose(got, expected, { rel: 0, abs: tol }, input);
}

/** Relative tolerance with an absolute floor, the case named by what is compared and its input. */
export function closeTo(got: number, expected: number, relTol: number, what: string, input: unknown, absTol = 0): void {
  assertClose(got, expected, { rel: relTol, abs: absTol }, `${what}\n  input     ${JSON.stringify(input)}`);
}
