/**
 * `run --plots DIR`: where the command line writes each result's plots as SVG files. The plot geometry comes
 * from src/report/plots.ts (`plotsFor`); turning geometry into standalone SVG text belongs to the report layer.
 * Until that writer exists, this hook refuses the option clearly (exit 2) instead of ignoring it.
 */
import type { Result } from '../stats/result';

export class PlotsUnavailableError extends Error {}

/**
 * Writes the plots of `result` into `dir` as `<baseName>-<plot>.svg`; returns the files written.
 * Connect here: render each `plotsFor(result, decimals)` entry to SVG text and write it.
 */
export async function writeResultPlots(_dir: string, _baseName: string, _result: Result, _decimals: number): Promise<string[]> {
  throw new PlotsUnavailableError('--plots: writing plots as SVG files is not available in this version of the command line');
}
