// Where a positioned error points, as an absolute path: a relative file in an error is relative to the spec
// that was running (a spec in a subfolder reads `../data/…`), and only otherwise to the workspace folder.
// No vscode import, so it is unit-tested in plain Node.
import * as path from 'node:path';

export function resolveErrorFile(file: string, specFolder: string | undefined, workspaceFolder: string | undefined): string {
  if (path.isAbsolute(file)) return file;
  return path.resolve(specFolder ?? workspaceFolder ?? '', file);
}

/** Remembers, per thrown error, the folder of the spec whose run threw it. */
const specFolders = new WeakMap<object, string>();

export function rememberSpecFolder(e: unknown, specPath: string): void {
  if (typeof e === 'object' && e !== null && !specFolders.has(e)) specFolders.set(e, path.dirname(specPath));
}

export function specFolderOf(e: unknown): string | undefined {
  return typeof e === 'object' && e !== null ? specFolders.get(e) : undefined;
}

/** "x.countercheck.json" as given; "x.json" or "x" become "x.countercheck.json"; a doubled suffix is folded. */
export function specFileName(file: string): string {
  const folded = file.replace(/(\.countercheck\.json)+$/i, '.countercheck.json');
  if (/\.countercheck\.json$/i.test(folded)) return folded;
  return `${folded.replace(/\.json$/i, '')}.countercheck.json`;
}

/**
 * A number typed into the distribution lookup: df > 0, x ≥ 0, 0 < p < 1. An empty or blank answer is
 * refused (Number("") is 0, which would silently become x = 0); so are text and non-finite values.
 */
export function parseLookupNumber(text: string, what: 'df' | 'x' | 'p'): number | undefined {
  const trimmed = text.trim().replace(/^(?:df|x|p|α|alpha)\s*=\s*/i, '');
  if (!/^[+]?(\d+\.?\d*|\.\d+)(e[+-]?\d+)?$/i.test(trimmed)) return undefined;
  const value = Number(trimmed);
  if (!Number.isFinite(value)) return undefined;
  if (what === 'df') return value > 0 ? value : undefined;
  if (what === 'x') return value >= 0 ? value : undefined;
  return value > 0 && value < 1 ? value : undefined;
}

/**
 * What makes two results "the same source" for the one-panel-per-source rule: the spec file (saved or
 * virtual, so every lookup shares one panel and every unsaved run on a data file shares one), else the
 * description of where the data came from.
 */
export function sourceKey(payload: { readonly origin?: { readonly specPath: string; readonly documentUri?: string; readonly spec?: Readonly<Record<string, unknown>> }; readonly sourceDescription: string }): string {
  // Unsaved runs share a virtual spec path per folder: the data source tells them apart.
  const source = payload.origin?.spec?.source as { path?: unknown; sql?: unknown } | undefined;
  const data = source ? JSON.stringify(source.path ?? source.sql ?? null) : '';
  if (payload.origin) return `${payload.origin.documentUri ?? ''}|${payload.origin.specPath}|${data}`;
  return `description|${payload.sourceDescription}`;
}
