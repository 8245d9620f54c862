/**
 * Runs one living report block: the block's JSON is either an inline spec (its source paths relative to
 * the report) or {"spec": "path/to/test.countercheck.json"} (relative to the report). Shared by
 * `countercheck report` and the editor's CodeLens, with file access injected.
 */
import * as path from 'node:path';
import { errorMessage, InputError, isInputError, isInstance } from '../errors';
import type { ReportBlock } from '../report/blocks';
import type { FormatOptions } from '../report/format';
import { plotFolderName, resultMarkdown, withPlotLinks } from '../report/markdown';
import { plotFiles } from '../report/svg';
import { withPlace } from './arguments';
import { childPath, locatePath, parseJsonWithLocations, type LocatedJson } from './json-text';
import { resolveSourcePath } from './paths';
import { runSpec } from './run';
import type { RunOptions, SpecRun, SpecV1 } from './types';
import { SpecError, loadSpecText, locateProblems, validateSpec } from './validate';

export interface BlockRunOptions extends Omit<RunOptions, 'specPath'> {
  /** Path of the markdown report (absolute or relative to the process's folder). */
  readonly reportPath: string;
  /** Reads a spec file named by a block (already resolved and checked). */
  readText(file: string): Promise<string>;
  readonly format?: FormatOptions;
}

export interface BlockRun {
  readonly run: SpecRun;
  readonly spec: SpecV1;
  /** The result's markdown, ending with a relative link to each plot file. */
  readonly markdown: string;
  /** The plot files the markdown links to (absolute paths beside the report), to be written with the block. */
  readonly plots: readonly { readonly file: string; readonly svg: string }[];
}

/** The message of an error, with `file:line:column:` in front when its JSON path can be located. */
export function describeRunError(e: unknown, file: string, located?: LocatedJson): string {
  if (isInstance(e, SpecError)) return e.message;
  if (isInputError(e)) {
    const jsonPath = e.location.jsonPath ?? sourceColumnPath(e.code, e.location.column, located);
    const at = located && jsonPath ? locatePath(located, jsonPath) : undefined;
    // A data error names its own file, line and column in the message; the spec file goes in front.
    const where = at ? `${file}:${at.line}:${at.column}` : file;
    return `${where}: ${jsonPath ? withPlace(e.message, jsonPath) : e.message}`;
  }
  if (isInstance(e, Error) && e.name === 'AbortError') return `${file}: cancelled`;
  return `${file}: ${errorMessage(e)}`;
}

/** For a column the data lacks, the place in the spec that names it ($.source.columns[i] or $.source.weight). */
function sourceColumnPath(code: string, column: string | undefined, located: LocatedJson | undefined): string | undefined {
  if (code !== 'unknown-column' || column === undefined || !located) return undefined;
  const source = (located.value as { source?: { columns?: unknown; weight?: unknown } } | null)?.source;
  const index = Array.isArray(source?.columns) ? source.columns.indexOf(column) : -1;
  if (index >= 0) return `$.source.columns[${index}]`;
  return source?.weight === column ? '$.source.weight' : undefined;
}

/**
 * Runs one block. Its errors are written into a report that is shared, so every absolute path in them (the
 * report's, a spec's, a data file's, or one inside a reader's own message) is shown relative to the report.
 */
export async function runReportBlock(block: ReportBlock, options: BlockRunOptions): Promise<BlockRun> {
  try {
    return await runBlock(block, options);
  } catch (e) {
    if (isInstance(e, Error) && e.name === 'AbortError') throw e;
    const relative = relativeToReport(path.dirname(path.resolve(options.reportPath)));
    const location = isInputError(e) ? { ...e.location, ...(e.location.file !== undefined ? { file: relative(e.location.file) } : {}) } : {};
    throw new InputError(relative(errorMessage(e)), location, isInputError(e) ? e.code : 'run-failed');
  }
}

/** Rewrites every absolute path in a text (POSIX or Windows) relative to `folder`. */
export function relativeToReport(folder: string): (text: string) => string {
  return (text) =>
    text.replace(/(?<![\w.~-])(\/[^\s'"`:,;()]+|[A-Za-z]:\\[^\s'"`:,;()]+)/g, (absolute) => {
      const relative = path.relative(folder, absolute);
      return relative === '' ? '.' : relative.split(path.sep).join('/');
    });
}

async function runBlock(block: ReportBlock, options: BlockRunOptions): Promise<BlockRun> {
  const reportFile = options.reportPath;
  // Pad with the lines above the block so that positions in errors are positions in the report.
  const padded = '\n'.repeat(block.bodyLine - 1) + block.body;
  const located = parseJsonWithLocations(padded, reportFile);
  const value = located.value;
  const runOptions = { readers: options.readers, allowedRoot: options.allowedRoot, allowOutsideRoot: options.allowOutsideRoot, signal: options.signal, onProgress: options.onProgress };
  let spec: SpecV1;
  let run: SpecRun;
  if (value && typeof value === 'object' && !Array.isArray(value) && 'spec' in value) {
    const extra = Object.keys(value).filter((k) => k !== 'spec');
    if (extra.length || typeof value.spec !== 'string') {
      const problems = [
        ...(typeof value.spec !== 'string' ? [{ path: '$.spec', message: 'expected the path of a spec file (a string)' }] : []),
        ...extra.map((k) => ({ path: childPath('$', k), message: `unknown field "${k}" (a block holds either a spec, or {"spec": "path"} alone)` })),
      ];
      throw new SpecError(locateProblems(problems, located), reportFile);
    }
    const reportFolder = path.dirname(path.resolve(reportFile));
    const specFile = resolveSourcePath(reportFolder, value.spec, { allowedRoot: options.allowedRoot ?? reportFolder, allowOutsideRoot: options.allowOutsideRoot }, '$.spec');
    const shown = path.join(path.dirname(reportFile), value.spec);
    let text: string;
    try {
      text = await options.readText(specFile);
    } catch (e) {
      const at = locatePath(located, '$.spec');
      throw new InputError(`${reportFile}:${at?.line}:${at?.column}: cannot read the spec ${shown}: ${errorMessage(e)}`, { file: reportFile, line: at?.line }, 'missing-spec');
    }
    const loaded = loadSpecText(text, shown);
    spec = loaded.spec;
    try {
      run = await runSpec(spec, { ...runOptions, specPath: specFile });
    } catch (e) {
      throw new InputError(describeRunError(e, shown, loaded.located), { file: shown }, isInputError(e) ? e.code : 'run-failed');
    }
  } else {
    const problems = validateSpec(value);
    if (problems.length) throw new SpecError(locateProblems(problems, located), reportFile);
    spec = value as unknown as SpecV1;
    try {
      run = await runSpec(spec, { ...runOptions, specPath: reportFile });
    } catch (e) {
      throw new InputError(describeRunError(e, reportFile, located), { file: reportFile }, isInputError(e) ? e.code : 'run-failed');
    }
  }
  const decimals = options.format?.decimals ?? 2;
  const reportAbsolute = path.resolve(reportFile);
  const folder = plotFolderName(reportAbsolute);
  const files = plotFiles(run.result, `block${block.index + 1}`, decimals);
  const markdown = withPlotLinks(resultMarkdown(run.result, { decimals, title: spec.title }), files.map((f) => ({ link: `${folder}/${f.name}`, alt: f.title })));
  return { run, spec, markdown, plots: files.map((f) => ({ file: path.join(path.dirname(reportAbsolute), folder, f.name), svg: f.svg })) };
}
