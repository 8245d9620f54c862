/**
 * Where a spec may read from. A spec is data, never code, and one from an untrusted folder must not
 * read files outside it: source paths are relative to the spec file, absolute paths and `..` escapes
 * out of the allowed root are refused unless the user allows them. Pure (path arithmetic only; the
 * host that follows symbolic links is responsible for checking the real path if it cares).
 */
import * as path from 'node:path';
import { InputError } from '../errors';

export interface PathPolicy {
  /** The folder the spec's sources must stay inside. */
  readonly allowedRoot: string;
  /** Allow absolute paths and escapes out of the root (off by default). */
  readonly allowOutsideRoot?: boolean;
  /** Path style; defaults to the platform's. Tests pass `path.posix` or `path.win32`. */
  readonly pathModule?: path.PlatformPath;
}

export const OUTSIDE_ROOT_HINT =
  'allow it with the setting countercheck.allowPathsOutsideWorkspace, or with --allow-outside on the command line';

/** True for `/x`, `C:\x`, `C:x`, `\\server\share`: every path the spec must not name directly. */
export function looksAbsolute(p: string): boolean {
  return path.posix.isAbsolute(p) || path.win32.isAbsolute(p) || /^[A-Za-z]:/.test(p);
}

/**
 * Resolves a source path written in a spec against the spec's folder, enforcing the policy.
 * @param specFolder folder of the spec file (absolute)
 * @param sourcePath the path as written in the spec
 * @param jsonPath where the path sits in the spec, for the error
 * @returns the absolute path to read
 */
export function resolveSourcePath(specFolder: string, sourcePath: string, policy: PathPolicy, jsonPath = '$.source.path'): string {
  const p = policy.pathModule ?? path;
  if (sourcePath.trim() === '') throw new InputError(`${jsonPath}: the path is empty`, { jsonPath }, 'empty-path');
  if (sourcePath.includes('\0')) throw new InputError(`${jsonPath}: the path contains a NUL character`, { jsonPath }, 'bad-path');
  if (looksAbsolute(sourcePath)) {
    if (!policy.allowOutsideRoot) {
      throw new InputError(
        `${jsonPath}: absolute paths are not allowed in a spec (found ${JSON.stringify(sourcePath)}); write the path relative to the spec file, or ${OUTSIDE_ROOT_HINT}`,
        { jsonPath },
        'absolute-path',
      );
    }
    return p.resolve(sourcePath);
  }
  const resolved = p.resolve(specFolder, sourcePath);
  if (!policy.allowOutsideRoot && !isInside(policy.allowedRoot, resolved, p)) {
    throw new InputError(
      `${jsonPath}: ${JSON.stringify(sourcePath)} leads outside the folder the spec may read from (${policy.allowedRoot}); ${OUTSIDE_ROOT_HINT}`,
      { jsonPath },
      'path-outside-root',
    );
  }
  return resolved;
}

/** True when `candidate` is `root` or lies below it. */
export function isInside(root: string, candidate: string, p: path.PlatformPath = path): boolean {
  const relative = p.relative(p.resolve(root), p.resolve(candidate));
  return relative === '' || (relative !== '..' && !relative.startsWith('..' + p.sep) && !p.isAbsolute(relative));
}
