// The words of results: stats/ returns phrase codes and arguments, report/words writes every sentence through the
// translator it is given. The English itself is checked where it always was (the procedures' tests, the recorded demo
// results, the living reports); here: nothing bypasses the translator, and a missing wording is an error, not a gap.
import { strict as assert } from 'node:assert';
import { distributionFitTest } from '../../../src/stats/procedures/distfit';
import { goodnessOfFit } from '../../../src/stats/procedures/fit';
import { pairedTest } from '../../../src/stats/procedures/paired';
import { postHocTest } from '../../../src/stats/procedures/posthoc';
import { powerAnalysis } from '../../../src/stats/procedures/power';
import { stratifiedTest } from '../../../src/stats/procedures/stratified';
import { independenceTest } from '../../../src/stats/procedures/table';
import { cochranArmitageTest } from '../../../src/stats/procedures/trend';
import { varianceTestFromValues } from '../../../src/stats/procedures/variance';
import type { ComputedResult, Result } from '../../../src/stats/result';
import { wordNotice, wordResult, words } from '../../../src/report/words/result';
import { english, type Translate } from '../../../src/report/words/translate';

/** A translator that marks what it wrote, so a sentence written around it shows up unmarked. */
const marked: Translate = (message, ...args) => `⟦${english(message, ...args)}⟧`;
const unmark = (text: string): string => text.replace(/[⟦⟧]/g, '');

// Invented inputs chosen so that notices, assumptions, notes and intervals of each kind appear.
const computed: Record<string, ComputedResult> = {
  'goodness of fit, rescaled and small counts': goodnessOfFit([1, 2, 30, 0], { expected: [2, 2, 20, 0], labels: ['a', 'b', 'c', 'd'], variable: 'tray' }),
  'independence, 2×2 with a zero cell': independenceTest([[0, 7], [9, 3]], { correction: true, rowVariable: 'oven', columnVariable: 'defect' }),
  'independence, 3×2 with an empty row': independenceTest([[4, 9], [0, 0], [12, 5]]),
  'variance from values': varianceTestFromValues([9.8, 10.4, 10.1, 9.6, 10.9, 10.2, 9.9, 10.0], { sigma0: 0.2, unit: 'g', variable: 'fill' }),
  'paired 2×2': pairedTest([[20, 3], [11, 30]]),
  'paired 3×3 with an empty pair': pairedTest([[5, 2, 0], [4, 6, 3], [0, 1, 8]]),
  'stratified 2×2×3': stratifiedTest([[[4, 6], [2, 9]], [[5, 5], [3, 8]], [[7, 3], [4, 6]]]),
  'post-hoc by cells': postHocTest([[10, 20, 30], [25, 15, 5]]),
  'trend without scores': cochranArmitageTest([[3, 6, 9, 12], [17, 14, 11, 8]]),
  'Poisson fit': distributionFitTest([0, 1, 1, 2, 2, 2, 3, 3, 4, 0, 1, 2, 5, 1, 0, 2, 3, 1, 2, 6, 0, 1, 2, 2, 3, 1, 4, 2, 1, 0], { family: 'poisson' }),
  'power, sample size': powerAnalysis({ target: 'independence', effectSize: 0.3, df: 2, power: 0.8 }),
};

/** Every text of a result that a reader sees, with where it is. */
function shownTexts(r: Result): [string, string][] {
  const texts: [string, string][] = r.notices.map((n, i) => [`notices[${i}]`, n.message]);
  if (r.kind === 'power') return [...texts, ['effectSize.name', r.effectSize.name]];
  if (r.kind !== 'test') return texts;
  texts.push(['procedure', r.procedure], ['conclusion', r.conclusion]);
  r.assumptions.forEach((a, i) => {
    texts.push([`assumptions[${i}].title`, a.title], [`assumptions[${i}].explanation`, a.explanation]);
    if (a.alternative !== undefined) texts.push([`assumptions[${i}].alternative`, a.alternative]);
  });
  for (const [list, items] of [['effectSizes', r.effectSizes], ['estimates', r.estimates], ['otherStatistics', r.otherStatistics]] as const) {
    items.forEach((e, i) => {
      texts.push([`${list}[${i}].name`, e.name]);
      if (e.note !== undefined) texts.push([`${list}[${i}].note`, e.note]);
    });
  }
  return texts;
}

describe('result words', () => {
  it('english fills each numbered placeholder, repeats, and leaves inserted text and missing arguments alone', () => {
    assert.equal(english('{0} and {1}, again {0}', 'a{1}', 2), 'a{1} and 2, again a{1}');
    assert.equal(english('no {2} here', 'x'), 'no {2} here');
  });

  for (const [name, result] of Object.entries(computed)) {
    it(`${name}: every sentence a reader sees comes from the translator`, () => {
      const texts = shownTexts(wordResult(result, marked));
      assert.ok(texts.length >= 3, `only ${texts.length} texts`);
      const bypassing = texts.filter(([, text]) => !(text.startsWith('⟦') && text.endsWith('⟧')));
      assert.deepEqual(bypassing, []);
    });

    it(`${name}: in English the words are what the translator was given, and JSON keeps its field order`, () => {
      const plain = wordResult(result);
      const viaMarks = JSON.parse(unmark(JSON.stringify(wordResult(result, marked))));
      assert.deepEqual(viaMarks, JSON.parse(JSON.stringify(plain)));
      assert.equal(JSON.stringify(Object.keys(plain)), JSON.stringify(Object.keys(viaMarks)));
    });
  }

  it('the inputs above raise the notices they are meant to show', () => {
    const codes = Object.values(computed).flatMap((r) => r.notices.map((n) => n.code));
    for (const code of ['rescaled-expected', 'small-expected', 'continuity-correction', 'haldane-anscombe', 'dropped-empty-row', 'empty-pairs-dropped', 'default-scores', 'power-df', 'sample-size-rounding']) {
      assert.ok(codes.includes(code), `${code} not raised; raised: ${codes.join(', ')}`);
    }
  });

  it('an unknown phrase, notice or a missing argument is an error that names it, never a sentence with a gap', () => {
    assert.throws(() => words({ code: 'conclusion.nothing-like-this' }), /no wording for the phrase "conclusion\.nothing-like-this"/);
    assert.throws(() => wordNotice({ code: 'no-such-notice', severity: 'info' }), /no wording for the notice "no-such-notice"/);
    assert.throws(() => words({ code: 'conclusion.goodness-of-fit', args: { alpha: 0.05 } }), /phrase argument "(significant|p|uniform)"/);
  });

  it('a sentence written outside stats (a data reader\'s notice) passes through unchanged', () => {
    const notice = { code: 'merged-header', severity: 'info' as const, message: 'Merged header cells were split.' };
    assert.equal(wordNotice(notice, marked), notice);
  });
});
