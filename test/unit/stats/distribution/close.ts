import assert from 'node:assert/strict';

/** Relative difference |got − expected| / |expected| (absolute when expected is 0). */
export function relativeError(got: number, expected: number): number {
  if (got === expected) return 0;
  if (expected === 0 || !Number.isFinite(expected)) return Math.abs(got - expected);
  return Math.abs(got - expected) / Math.abs(expected);
}

/** Asserts |got − expected| ≤ tol · |expected| and prints input, expected, got, Δ and tolerance otherwise. */
export function assertRelative(got: number, expected: number, tol: number, input: string): void {
  const err = relativeError(got, expected);
  if (!(err <= tol))
    assert.fail(
    `${input}: expected ${expected}, got ${got}, Δ = ${got - expected} (relative ${err.toExponential(3)}), tolerance ${tol} relative`,
  );
}

/** Asserts |got − expected| ≤ tol and prints input, expected, got, Δ and tolerance otherwise. */
export function assertAbsolute(got: number, expected: number, tol: number, input: string): void {
  const delta = got - expected;
  if (!(Math.abs(delta) <= tol))
    assert.fail(
    `${input}: expected ${expected}, got ${got}, Δ = ${delta}, tolerance ${tol} absolute`,
  );
}
