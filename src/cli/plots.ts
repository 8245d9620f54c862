/**
 * `run --plots DIR`: writes each result's plots as standalone SVG files (the report layer renders them from the
 * same geometry the panel draws: src/report/plots.ts → src/report/svg.ts).
 */
import { mkdir, writeFile } from 'node:fs/promises';
import * as path from 'node:path';
import { plotFiles } from '../report/svg';
import type { Result } from '../stats/result';

/** Writes the plots of `result` into `dir` as SVG files named after `baseName`; returns the files written. */
export async function writeResultPlots(dir: string, baseName: string, result: Result, decimals: number): Promise<string[]> {
  const plots = plotFiles(result, baseName, decimals);
  if (plots.length === 0) return [];
  await mkdir(dir, { recursive: true });
  const written: string[] = [];
  for (const plot of plots) {
    const file = path.join(dir, plot.name);
    await writeFile(file, plot.svg, 'utf8');
    written.push(file);
  }
  return written;
}
