// Report content (not layout): the APA line, the exact small p-value, effect sizes, warnings and the
// caution appear in the text, markdown and JSON of real results. The numbers themselves are checked
// against published values where one exists; the procedures' own accuracy is tested in test/unit/stats.
import { strict as assert } from 'node:assert';
import { wordResult } from '../../../src/report/words/result';
import { resultJson } from '../../../src/report/json';
import { escapeMarkdown, markdownTable, resultMarkdown } from '../../../src/report/markdown';
import { CAUTION, resultText } from '../../../src/report/text';
import { goodnessOfFit } from '../../../src/stats/procedures/fit';
import { independenceTest } from '../../../src/stats/procedures/table';
import { varianceTestFromSummary, varianceTestFromValues } from '../../../src/stats/procedures/variance';
import { distributionProcedure } from '../../../src/savedtest/procedures/distribution';
import type { DistributionResult } from '../../../src/stats/result';

// Mendel's dihybrid cross against 9:3:3:1 (published: X² = 0.470, p = 0.925).
const mendel = wordResult(goodnessOfFit([315, 108, 101, 32], { ratios: [9, 3, 3, 1], labels: ['round | yellow', 'round green', 'wrinkled yellow', 'wrinkled green'] }));
// Agresti's aspirin and heart attack 2×2 (from memory: X² = 25.01, odds ratio 1.832 (1.440, 2.331)).
const aspirin = wordResult(independenceTest([[189, 10845], [104, 10933]], { rowLabels: ['placebo', 'aspirin'], columnLabels: ['heart attack', 'none'] }));
// Montgomery & Runger bottle fill (n = 20, s² = 0.0153, σ0² = 0.01): χ² = 29.07 with 19 df.
const bottles = wordResult(varianceTestFromSummary({ n: 20, variance: 0.0153 }, { variance0: 0.01, alternative: 'greater' }));
// A table so lopsided that the p-value is far below the double range.
const extreme = wordResult(independenceTest([[50000, 10], [10, 50000]]));

describe('report content', () => {
  it('text: conclusion, APA line with df and N, effect size and caution', () => {
    const text = resultText(mendel, { decimals: 2, title: 'Pea seed shapes' });
    assert.match(text, /^Pea seed shapes\n/);
    assert.ok(text.includes('χ²(3, N = 556) = 0.47, p = .925'), text);
    assert.ok(text.includes(mendel.conclusion));
    assert.match(text, /Cohen's w = 0\.0291/);
    assert.ok(text.includes(CAUTION));
    assert.match(CAUTION, /significance is not practical importance/);
    assert.match(CAUTION, /assumptions/);
    assert.match(CAUTION, /safety or health.*qualified review/);
  });

  it('text: the variance test shows its one-sided bound and the normality warning', () => {
    const text = resultText(bottles);
    assert.ok(text.includes('χ²(19, N = 20) = 29.07, p = .065'), text);
    assert.match(text, /95% bound for σ²|95% CI for σ²/);
    assert.match(text, /Warnings:\n {2}! .*normal/);
  });

  it('text: the data line names the file, the records read and dropped, before the caution', () => {
    const text = resultText(mendel, { decimals: 2, data: { description: 'data/peas.csv', rows: 560, dropped: 4, sha256: 'ab'.repeat(32) } });
    assert.match(text, /\nData: data\/peas\.csv, 560 records, 4 dropped for missing values \(sha256 abababababab…\)\nCaution: /);
  });

  it('text: a p-value far below the double range is given as a power of ten', () => {
    assert.equal(extreme.pValue.value, 0);
    const text = resultText(extreme);
    assert.match(text, /p < \.001\n\s+p ≈ \d\.\d × 10\^-\d{4,}/);
  });

  it('text: odds ratio with its interval, and the other statistics', () => {
    const text = resultText(aspirin);
    assert.ok(text.includes('χ²(1, N = 22,071) = 25.01, p < .001'), text);
    assert.match(text, /Odds ratio = 1\.83, 95% CI \[1\.44, 2\.33\]/);
    assert.match(text, /G²\(1, N = 22,071\)/);
  });

  it('text: distribution queries name both tails and the critical values', async () => {
    const result = (await distributionProcedure.run({ test: 'distribution', df: 10, x: 18.307, p: 0.05 }, { hasSource: false, aggregate: () => Promise.reject(new Error('no source')) })) as DistributionResult;
    const text = resultText(result);
    assert.match(text, /10 degrees of freedom/);
    assert.match(text, /x = 18\.31: P\(X > x\) = 0\.050/);
    assert.match(text, /upper critical value 18\.307/); // NIST/SEMATECH e-Handbook §1.3.6.7.4: df 10, upper 0.05 → 18.307
  });

  it('text and markdown: a density or critical value below the double range is a power of ten, never 0.00', async () => {
    const result = (await distributionProcedure.run({ test: 'distribution', df: 1, x: [2000, 0], p: 1e-300 }, { hasSource: false, aggregate: () => Promise.reject(new Error('no source')) })) as DistributionResult;
    const text = resultText(result);
    // Closed forms for χ²(1): density e^(−x/2)/sqrt(2πx) = 10^-436.344 at x = 2000; lower quantile πp²/2 = 1.571e-600 at p = 1e-300.
    assert.match(text, /x = 2,000\.00: .*density 4\.53 × 10\^-437\n/);
    assert.match(text, /lower 1\.571 × 10\^-600 \(P\(X ≤ c\) = 1e-300\), two-sided \[3\.927 × 10\^-601, /);
    assert.doesNotMatch(text, /0\.00(?!\d)(?!: )/);
    const md = resultMarkdown(result);
    assert.match(md, /\| 2,000\.00 \| 9\.05 × 10\^-437 \| 1\.000 \| 4\.53 × 10\^-437 \|/);
    assert.match(md, /\| 1e-300 \| 1,373\.873 \| 1\.571 × 10\^-600 \| \[3\.927 × 10\^-601, 1,375\.258\] \|/);
    // At x = 0 with df = 3 the density is truly 0, and prints as 0.
    const zero = (await distributionProcedure.run({ test: 'distribution', df: 3, x: 0 }, { hasSource: false, aggregate: () => Promise.reject(new Error('no source')) })) as DistributionResult;
    assert.match(resultText(zero), /density 0\n/);
  });

  it('text and markdown: the variance test states its σ² interval once, with the sample variance', () => {
    const text = resultText(bottles);
    assert.match(text, /Estimate: Sample variance s² = 0\.0153, 95% bound for σ² \[0\.00\d+, ∞\)/);
    assert.doesNotMatch(text, /^Interval:/m);
    // Every interval for a population quantity says which one; the odds ratio's needs no such note (see below).
    assert.match(text, /Estimate: Sample standard deviation s = 0\.124, 95% bound for σ \[/);
    assert.match(text, /Variance ratio s²\/σ0² = 1\.53, 95% bound for σ²\/σ0² \[/);
    const bound = /\[0\.00\d+, ∞\)/.exec(text)![0];
    assert.equal(text.split(bound).length - 1, 1, text);
    const md = resultMarkdown(bottles);
    assert.match(md, /p = \.065; .*Sample variance s² = 0\.0153, 95% bound for σ² \\\[0\.00\d+, ∞\)/);
    assert.equal(md.split(bound.replace('[', '\\[')).length - 1, 1, md);
    // A result whose main interval belongs to no estimate still prints it on its own line.
    const bare = resultText({ ...bottles, estimates: [] });
    assert.match(bare, /\nInterval: 95% bound for σ² \[/);
  });

  it('markdown: category table with residuals, escaped labels, and the caution', () => {
    const md = resultMarkdown(mendel);
    // Our reading order: deviation, z, share of χ², then the counts. Round yellow: 315 − 312.75 = +2.25, and
    // its share of X² is (2.25²/312.75) / 0.4700 = 3.4 % (hand computation).
    assert.match(md, /\| Category \| Observed − expected \| z \| Share of χ² \| Observed \| Expected \|/);
    assert.match(md, /\| round \\\| yellow \| \+2\.25 \| \+0\.19 \| 3\.4 % \| 315 \| 312\.75 \|/);
    assert.match(md, /χ²\(3, N = 556\) = 0\.47, p = \.925/);
    assert.match(md, /\*Statistical significance is not practical importance/);
  });

  it('markdown: r×c tables show observed (expected) counts and adjusted residuals', () => {
    const md = resultMarkdown(aspirin);
    assert.match(md, /\| placebo \| 189 \(146\.48\) \| 10,845 \(10,887\.52\) \| 11,034 \|/);
    assert.match(md, /\| Adjusted residual \| heart attack \| none \|/);
  });

  it('markdownTable right-aligns numeric columns', () => {
    assert.equal(markdownTable(['a', 'b'], [['x', '1']]), '| a | b |\n| --- | ---: |\n| x | 1 |');
  });

  it('json: the promised fields, with the p-value also as log10', () => {
    const json = resultJson(aspirin) as Record<string, unknown>;
    for (const key of ['test', 'statistic', 'df', 'pValue', 'pValueLog10', 'expected', 'residuals', 'effectSize', 'warnings']) assert.ok(key in json, key);
    assert.equal(json.test, 'independence');
    assert.equal(json.df, 1);
    assert.ok(Math.abs((json.statistic as number) - 25.01) < 0.005);
    assert.deepEqual(Object.keys(json.residuals as object), ['pearson', 'adjusted']);
    const small = resultJson(extreme) as { pValue: number; pValueLog10: number };
    assert.equal(small.pValue, 0);
    assert.ok(small.pValueLog10 < -1000);
    const variance = resultJson(bottles) as { confidenceInterval: { lower: number; upper: number | null; level: number } };
    assert.equal(variance.confidenceInterval.level, 0.95);
    assert.ok('upper' in variance.confidenceInterval && 'lower' in variance.confidenceInterval);
  });

  it('json: raw-data variance results carry their warnings', () => {
    const json = resultJson(wordResult(varianceTestFromValues([1, 2, 2, 3, 3, 3, 4, 4, 5, 30], { sigma0: 1 }))) as { warnings: string[] };
    assert.ok(json.warnings.length > 0);
  });
});

describe('markdown escaping', () => {
  it('escapes what would change the rendering, and nothing else', () => {
    assert.equal(escapeMarkdown('a|b'), 'a\\|b');
    assert.equal(escapeMarkdown('p < .001'), 'p < .001');
    assert.equal(escapeMarkdown('<script> and *bold* and [link]'), '\\<script> and \\*bold\\* and \\[link\\]');
    assert.equal(escapeMarkdown('# not a heading'), '\\# not a heading');
    assert.equal(escapeMarkdown('two\nlines'), 'two lines');
  });
});
