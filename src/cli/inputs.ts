/**
 * Command-line inputs to files: a file stays itself; a folder is searched recursively for files with the
 * wanted ending (skipping node_modules and folders whose name starts with a dot); a quoted glob is matched
 * with picomatch from its literal base folder, skipping the same folders. An input that names nothing
 * becomes an entry with an error, so every input appears in the output.
 */
import { readdir, stat } from 'node:fs/promises';
import * as path from 'node:path';
import picomatch from 'picomatch';

export interface InputFile {
  /** The name shown to the user: the input as given, or the folder or glob base joined with the match. */
  readonly name: string;
  /** Set when the input could not be expanded (a folder or glob with no matches). */
  readonly error?: { readonly code: string; readonly message: string };
}

const SKIPPED = (name: string) => name === 'node_modules' || name.startsWith('.');

/** Every file under `folder` (relative paths with `/`), sorted, not entering skipped folders. */
async function walk(folder: string, prefix = ''): Promise<string[]> {
  let entries;
  try {
    entries = await readdir(path.join(folder, prefix), { withFileTypes: true });
  } catch {
    return [];
  }
  const out: string[] = [];
  for (const e of entries.sort((a, b) => (a.name < b.name ? -1 : a.name > b.name ? 1 : 0))) {
    const rel = prefix ? `${prefix}/${e.name}` : e.name;
    if (e.isDirectory()) {
      if (!SKIPPED(e.name)) out.push(...(await walk(folder, rel)));
    } else if (e.isFile()) out.push(rel);
  }
  return out;
}

function joinShown(base: string, rel: string): string {
  if (base === '' || base === '.') return rel;
  return `${base.replace(/[\\/]+$/, '')}/${rel}`;
}

/**
 * Expands the inputs in order (duplicates dropped). `ending` is what a folder's files must end with
 * (".countercheck.json"), or undefined when folders are not accepted (reports).
 */
export async function expandInputs(inputs: readonly string[], cwd: string, ending: string | undefined): Promise<InputFile[]> {
  const out: InputFile[] = [];
  const seen = new Set<string>();
  const add = (f: InputFile) => {
    const key = f.error ? `\0${f.name}` : path.resolve(cwd, f.name);
    if (!seen.has(key)) {
      seen.add(key);
      out.push(f);
    }
  };
  for (const input of inputs) {
    if (input === '-') {
      add({ name: '-' });
      continue;
    }
    const scan = picomatch.scan(input);
    if (scan.isGlob) {
      const isMatch = picomatch(scan.glob, { dot: false });
      const matches = (await walk(path.resolve(cwd, scan.base))).filter((rel) => isMatch(rel));
      if (matches.length === 0) add({ name: input, error: { code: 'no-match', message: `${input}: the pattern matches no file` } });
      for (const rel of matches) add({ name: joinShown(scan.base, rel) });
      continue;
    }
    const info = await stat(path.resolve(cwd, input)).catch(() => undefined);
    if (info?.isDirectory()) {
      if (ending === undefined) {
        add({ name: input, error: { code: 'is-a-folder', message: `${input}: a folder; name the markdown files (or a glob such as '${joinShown(input, '*.md')}')` } });
        continue;
      }
      const found = (await walk(path.resolve(cwd, input))).filter((rel) => rel.endsWith(ending));
      if (found.length === 0) add({ name: input, error: { code: 'no-specs', message: `${input}: the folder holds no *${ending} file` } });
      for (const rel of found) add({ name: joinShown(input, rel) });
      continue;
    }
    add({ name: input });
  }
  return out;
}
