/**
 * Readers bundled as chunks of their own (dist/xlsx.js, dist/parquet.js: scripts/build.mjs), loaded on first use so
 * that activating the extension does not parse them. A chunk carries its own copy of every module it imports except
 * src/errors.ts: its build resolves that to the classes registered here (scripts/chunks/shared-errors.cjs), so an
 * InputError thrown inside a chunk is an InputError to `isInstance` outside it. Unbundled (tests, tsx), `load`
 * simply requires the TypeScript module.
 */
import * as errors from '../errors';

/** The key under which the loading bundle shares its error module with its chunks. */
export const SHARED_ERRORS_KEY = Symbol.for('countercheck.errors');

export function loadChunk<T>(load: () => T): T {
  const shared = globalThis as unknown as Record<symbol, unknown>;
  if (shared[SHARED_ERRORS_KEY] === undefined) shared[SHARED_ERRORS_KEY] = errors;
  return load();
}
