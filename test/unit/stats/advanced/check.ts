// Tolerance checks that print the input, the expected and computed values, Δ and the tolerance on failure.
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';

export function closeTo(got: number, expected: number, relTol: number, what: string, input: unknown, absTol = 0): void {
  const delta = Math.abs(got - expected);
  const tol = Math.max(relTol * Math.abs(expected), absTol);
  const ok = got === expected || delta <= tol;
  assert.ok(ok, `${what}\n  input:    ${JSON.stringify(input)}\n  expected: ${expected}\n  got:      ${got}\n  Δ:        ${delta}\n  tolerance: ${tol}`);
}

export function fixture<T>(reference: string, name: string): T {
  return JSON.parse(readFileSync(join(__dirname, '..', '..', '..', 'fixtures', reference, `${name}.json`), 'utf8')) as T;
}
