import { strict as assert } from 'node:assert';
import { InputError, isInstance } from '../../../src/errors';

/** Asserts that `run` throws an InputError with exactly this message (and code, when given). */
export function throwsInput(run: () => unknown, message: string, code?: string): InputError {
  try {
    run();
  } catch (e) {
    return expectInputError(e, message, code);
  }
  assert.fail(`expected an InputError with message: ${message}`);
}

export async function rejectsInput(run: () => Promise<unknown>, message: string, code?: string): Promise<InputError> {
  try {
    await run();
  } catch (e) {
    return expectInputError(e, message, code);
  }
  assert.fail(`expected an InputError with message: ${message}`);
}

function expectInputError(e: unknown, message: string, code: string | undefined): InputError {
  assert.ok(isInstance(e, InputError), `expected an InputError, got ${String(e)}`);
  assert.equal(e.message, message);
  if (code !== undefined) assert.equal(e.code, code);
  return e;
}
