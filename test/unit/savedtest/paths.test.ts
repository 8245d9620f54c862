// The allowed-root check for source paths: pure path arithmetic, tested for POSIX and Windows paths.
import { strict as assert } from 'node:assert';
import * as path from 'node:path';
import { isInputError } from '../../../src/errors';
import { isInside, resolveSourcePath } from '../../../src/savedtest/paths';

const posix = { allowedRoot: '/work/project', pathModule: path.posix };

function refusal(f: () => unknown): { code: string; message: string } {
  try {
    f();
  } catch (e) {
    assert.ok(isInputError(e));
    return { code: e.code, message: e.message };
  }
  assert.fail('expected a refusal');
}

describe('source path policy', () => {
  it('resolves a path relative to the spec folder', () => {
    assert.equal(resolveSourcePath('/work/project/demo', 'data/a.csv', posix), '/work/project/demo/data/a.csv');
  });

  it('allows .. while the path stays inside the root', () => {
    assert.equal(resolveSourcePath('/work/project/demo/specs', '../data/a.csv', posix), '/work/project/demo/data/a.csv');
  });

  it('refuses a .. escape out of the root, naming the JSON path', () => {
    const r = refusal(() => resolveSourcePath('/work/project/demo', '../../etc/passwd', posix));
    assert.equal(r.code, 'path-outside-root');
    assert.match(r.message, /^\$\.source\.path: "\.\.\/\.\.\/etc\/passwd" leads outside/);
  });

  it('refuses absolute paths, POSIX and Windows alike', () => {
    for (const p of ['/etc/passwd', 'C:\\data\\a.csv', 'C:a.csv', '\\\\server\\share\\a.csv']) {
      assert.equal(refusal(() => resolveSourcePath('/work/project', p, posix)).code, 'absolute-path', p);
    }
  });

  it('allows both when the user allows paths outside the root', () => {
    const open = { ...posix, allowOutsideRoot: true };
    assert.equal(resolveSourcePath('/work/project/demo', '../../x.csv', open), '/work/x.csv');
    assert.equal(resolveSourcePath('/work/project/demo', '/tmp/x.csv', open), '/tmp/x.csv');
  });

  it('does not mistake a sibling folder with the same prefix, or a name starting with .., for the inside', () => {
    assert.equal(isInside('/work/project', '/work/project-old/a.csv', path.posix), false);
    assert.equal(isInside('/work/project', '/work/project/..data/a.csv', path.posix), true);
  });

  it('applies the same rules to Windows paths', () => {
    const win = { allowedRoot: 'C:\\work\\project', pathModule: path.win32 };
    assert.equal(resolveSourcePath('C:\\work\\project\\demo', 'data\\a.csv', win), 'C:\\work\\project\\demo\\data\\a.csv');
    assert.equal(refusal(() => resolveSourcePath('C:\\work\\project\\demo', '..\\..\\secret.csv', win)).code, 'path-outside-root');
  });

  it('refuses an empty path', () => {
    assert.equal(refusal(() => resolveSourcePath('/work/project', ' ', posix)).code, 'empty-path');
  });
});
