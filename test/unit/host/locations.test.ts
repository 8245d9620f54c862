// Small host rules that need no editor: an error's file resolved against the spec that ran, the save
// dialog's file name, and the lookup's answers (an empty answer is refused, never read as 0).
import { strict as assert } from 'node:assert';
import { parseLookupNumber, rememberSpecFolder, resolveErrorFile, sourceKey, specFileName, specFolderOf } from '../../../src/host/locations';

describe('host locations and answers', () => {
  it('an error file relative to a spec in a subfolder resolves against that spec, not the workspace', () => {
    assert.equal(resolveErrorFile('../data/cafe.csv', '/ws/demo/advanced', '/ws'), '/ws/demo/data/cafe.csv');
    assert.equal(resolveErrorFile('data/x.csv', undefined, '/ws'), '/ws/data/x.csv');
    assert.equal(resolveErrorFile('/abs/x.csv', '/ws/a', '/ws'), '/abs/x.csv');
    const e = new Error('bad');
    rememberSpecFolder(e, '/ws/demo/advanced/t.countercheck.json');
    assert.equal(specFolderOf(e), '/ws/demo/advanced');
    assert.equal(specFolderOf(new Error('other')), undefined);
  });

  it('the saved test is named <name>.countercheck.json, never with the suffix twice', () => {
    assert.equal(specFileName('/w/fill.countercheck.json'), '/w/fill.countercheck.json');
    assert.equal(specFileName('/w/fill.countercheck.json.countercheck.json'), '/w/fill.countercheck.json');
    assert.equal(specFileName('/w/fill.json'), '/w/fill.countercheck.json');
    assert.equal(specFileName('/w/fill'), '/w/fill.countercheck.json');
  });

  it('one panel per source: lookups share one, runs of different specs do not', () => {
    const lookup = (n: number) => ({ origin: { specPath: '/ws/untitled.countercheck.json' }, sourceDescription: `lookup ${n}` });
    assert.equal(sourceKey(lookup(1)), sourceKey(lookup(2)));
    assert.notEqual(sourceKey({ origin: { specPath: '/ws/a.countercheck.json' }, sourceDescription: 'x' }), sourceKey({ origin: { specPath: '/ws/b.countercheck.json' }, sourceDescription: 'x' }));
    // Unsaved runs in one folder share the virtual spec path; their data files tell them apart.
    const unsaved = (file: string) => ({ origin: { specPath: '/ws/data/untitled.countercheck.json', spec: { source: { path: file } } }, sourceDescription: file });
    assert.notEqual(sourceKey(unsaved('oven.csv')), sourceKey(unsaved('bike.csv')));
    assert.equal(sourceKey(unsaved('bike.csv')), sourceKey(unsaved('bike.csv')));
    assert.notEqual(sourceKey({ origin: { specPath: '/ws/s.countercheck.json', documentUri: 'file:///a.md' }, sourceDescription: '' }), sourceKey({ origin: { specPath: '/ws/s.countercheck.json', documentUri: 'file:///b.md' }, sourceDescription: '' }));
  });

  it('lookup answers: empty and text refused; df > 0, x ≥ 0, 0 < α < 1', () => {
    for (const what of ['df', 'x', 'p'] as const) {
      assert.equal(parseLookupNumber('', what), undefined, `${what}: empty`);
      assert.equal(parseLookupNumber('   ', what), undefined, `${what}: blank`);
      assert.equal(parseLookupNumber('abc', what), undefined, `${what}: text`);
      assert.equal(parseLookupNumber('Infinity', what), undefined, `${what}: infinite`);
    }
    assert.equal(parseLookupNumber('0', 'df'), undefined);
    assert.equal(parseLookupNumber('4', 'df'), 4);
    assert.equal(parseLookupNumber('0', 'x'), 0);
    assert.equal(parseLookupNumber('-1', 'x'), undefined);
    assert.equal(parseLookupNumber(' 3.84 ', 'x'), 3.84);
    assert.equal(parseLookupNumber('0.05', 'p'), 0.05);
    assert.equal(parseLookupNumber('p=0.01', 'p'), 0.01);
    assert.equal(parseLookupNumber('.05', 'p'), 0.05);
    assert.equal(parseLookupNumber('1', 'p'), undefined);
    assert.equal(parseLookupNumber('0', 'p'), undefined);
  });
});
