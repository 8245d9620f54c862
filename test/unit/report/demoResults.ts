// Runs a demo spec through runSpec (the path the command line and the editor share), for report tests.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { aggregateFile } from '../../../src/data/file';
import { runSpec } from '../../../src/savedtest/run';
import type { SpecReaders } from '../../../src/savedtest/types';
import { loadSpecText } from '../../../src/savedtest/validate';
import type { Result } from '../../../src/stats/result';

export const demoFolder = join(__dirname, '..', '..', '..', 'demo');
const readers: SpecReaders = { aggregateFile: (path, request, options, control) => aggregateFile(path, request, options, { signal: control.signal }) };

/** The result and title of `demo/<file>` (file relative to demo/, e.g. "advanced/cask-spread-power.countercheck.json"). */
export async function demoResult(file: string): Promise<{ result: Result; title: string }> {
  const path = join(demoFolder, file);
  const { spec } = loadSpecText(readFileSync(path, 'utf8'), file);
  const { result } = await runSpec(spec, { readers, specPath: path, allowedRoot: demoFolder });
  return { result, title: String((spec as { title?: unknown }).title ?? file) };
}
