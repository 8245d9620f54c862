// The conclusion block cannot contradict the body: the answer, the effect size and a failed assumption
// with its alternative; an exact p-value named as such in every line that reports it; sections that do not
// apply to a result left out. Checked on the demo specs a reader meets first.
import { strict as assert } from 'node:assert';
import { testHeadline, presentedTest, namesAsQuoted } from '../../../src/report/headline';
import { english } from '../../../src/report/words/translate';
import { codeSpan, resultMarkdown, markdownWithNames } from '../../../src/report/markdown';
import { buildPanelPayload, type PayloadOptions } from '../../../src/report/panel';
import { resultText } from '../../../src/report/text';
import type { TestResult } from '../../../src/stats/result';
import { demoResult } from './demoResults';

const options: PayloadOptions = { id: 'r1', title: 't', sourceDescription: '', decimals: 2, canSave: true, canRerun: true, computedAt: '2026-12-01T00:00:00.000Z' };

describe('headline', () => {
  it('every sentence the headline writes goes through the translator, and the English is unchanged', async () => {
    const marked = (message: string, ...args: (string | number | boolean)[]) => `⟦${english(message, ...args)}⟧`;
    for (const file of ['bottling-fill-spread.countercheck.json', 'seed-coating-trial.countercheck.json', 'bakery-defect-mix.countercheck.json']) {
      const test = (await demoResult(file)).result as TestResult;
      const plain = testHeadline(test);
      const translated = testHeadline(test, undefined, marked);
      for (const part of ['effect', 'assumption'] as const) {
        if (plain[part] === undefined) continue;
        assert.match(translated[part] ?? '', /^⟦.*⟧$/, `${file}: ${part}`);
        assert.equal((translated[part] ?? '').replace(/[⟦⟧]/g, ''), plain[part], `${file}: ${part}`);
      }
    }
  });

  it('bottling spread: a significant variance test with normality not met says the robust bound is near σ0, in the headline', async () => {
    const { result } = await demoResult('bottling-fill-spread.countercheck.json');
    const test = result as TestResult;
    assert.equal(test.significant, true);
    const payload = buildPanelPayload(result, options);
    // The robust lower bound for σ is 1.2542 (Bonett 2006 as computed by the variance test): it excludes
    // σ0 = 1.25 by 0.3 %, so the headline shows enough digits to tell them apart and says the evidence is weaker.
    assert.match(payload.headlineAssumption ?? '', /^Normality is doubtful here/);
    assert.match(payload.headlineAssumption ?? '', /\[1\.254, ∞\) for σ only just excludes σ0 = 1\.250, so the evidence is weaker than the p-value suggests/);
    assert.match(payload.headline, /“fill_ml”/);
    assert.doesNotMatch(payload.headline, /`/);
    assert.ok(payload.keyEstimate, 'a key estimate beside the headline');
    assert.match(payload.keyEstimate.label, /standard deviation s/);
    // Plain text: the same sentence in the conclusion line, before the APA line.
    const text = resultText(result);
    const conclusion = text.split('\n').find((l) => l.startsWith('Conclusion:')) ?? '';
    assert.match(conclusion, /Normality is doubtful here/);
  });

  it('a variance test whose robust interval includes σ0 says the conclusion rests on normality', async () => {
    const { result } = await demoResult('bottling-fill-spread.countercheck.json');
    const test = result as TestResult;
    // The same result with the robust bound moved below σ0 (1.2 < 1.25).
    const moved: TestResult = { ...test, estimates: test.estimates.map((e) => (e.id === 'sdBonett' && e.interval ? { ...e, interval: { ...e.interval, lower: 1.2 } } : e)) };
    assert.match(testHeadline(moved).assumption ?? '', /\[1\.20, ∞\) for σ includes σ0 = 1\.25, so the evidence is weaker than the p-value suggests and the conclusion rests on normality/);
  });

  it('exact p-value: APA line and statistic line name it and agree; no advice to consider an exact test', async () => {
    const { result } = await demoResult('advanced/seedling-blight-exact.countercheck.json');
    const payload = buildPanelPayload(result, options);
    // Fisher–Freeman–Halton p = 0.02636 for this 3×3 table (recorded in the spec; the chi-square p is .018).
    assert.equal(payload.apaLine, 'χ²(4, N = 39) = 11.90, exact p = .026');
    const text = resultText(result);
    assert.match(text, /^Result: χ²\(4, N = 39\) = 11\.90, exact p = \.026$/m);
    assert.match(text, /chi-square approximation: χ²\(4, N = 39\) = 11\.90, p = \.018/);
    for (const shown of [text, resultMarkdown(result), ...payload.notices.map((n) => n.message), ...payload.assumptions.map((a) => `${a.explanation} ${a.alternative ?? ''}`)]) {
      assert.doesNotMatch(shown, /Consider an exact test/i);
    }
    assert.match(payload.headlineAssumption ?? '', /the exact p-value reported here does not rely on it/);
    assert.match(payload.assumptions.find((a) => a.id === 'expected-counts')?.alternative ?? '', /^used here: the exact p-value/);
    assert.match(resultMarkdown(result), /exact p = \.026/);
  });

  it('mid-p and Monte Carlo results name their p-value in the conclusion, the APA line and the statistic line', async () => {
    const paired = buildPanelPayload((await demoResult('advanced/cafe-panel-from-file.countercheck.json')).result, options);
    assert.match(paired.headline, /\(mid-p = 0\.029\)/);
    assert.match(paired.apaLine, /mid-p = \.029$/);
    const { result } = await demoResult('advanced/market-stall-days-montecarlo.countercheck.json');
    const text = resultText(result);
    assert.match(text, /^Conclusion: .*\(Monte Carlo p = 0\.125\)/m);
    assert.match(text, /^Result: χ²\(3, N = 26\) = 5\.69, Monte Carlo p = \.125$/m);
    assert.match(text, /^Also: Pearson chi-square, Monte Carlo p-value: .*Monte Carlo p = \.125/m);
  });

  it('an asymptotic result with small expected counts still advises the exact test', async () => {
    const { result } = await demoResult('advanced/seedling-blight-exact.countercheck.json');
    const test = result as TestResult;
    const asymptotic: TestResult = { ...test, details: { ...test.details, method: undefined } };
    assert.equal(presentedTest(asymptotic), asymptotic);
    assert.match(resultText(asymptotic), /Consider an exact test/);
    assert.match(testHeadline(asymptotic).assumption ?? '', /use an exact test \(Fisher–Freeman–Halton\) or a Monte Carlo p-value instead/);
  });

  it('power plan: no assumptions section, no significance caution, its own caution', async () => {
    const { result } = await demoResult('advanced/cask-spread-power.countercheck.json');
    const payload = buildPanelPayload(result, options);
    assert.deepEqual(payload.assumptions, []);
    assert.doesNotMatch(payload.caution, /significance/i);
    assert.match(payload.caution, /effect size/);
    assert.doesNotMatch(resultText(result), /Statistical significance is not practical importance/);
    assert.doesNotMatch(resultMarkdown(result), /Statistical significance is not practical importance/);
  });

  it('distribution lookup: no assumptions, no caution', async () => {
    const { result } = await demoResult('audit-critical-values.countercheck.json');
    const payload = buildPanelPayload(result, options);
    assert.deepEqual(payload.assumptions, []);
    assert.equal(payload.caution, '');
    assert.doesNotMatch(resultText(result), /Caution/);
  });

  it('names: quoted in plain text, code spans (not escaped backticks) in markdown', async () => {
    assert.equal(namesAsQuoted('spread of `fill_ml` and `a b`'), 'spread of “fill_ml” and “a b”');
    assert.equal(markdownWithNames('spread of `fill_ml` *x*'), 'spread of `fill_ml` \\*x\\*');
    assert.equal(codeSpan('a`b'), '``a`b``');
    assert.equal(codeSpan('`x'), '`` `x ``');
    const { result } = await demoResult('bottling-fill-spread.countercheck.json');
    const markdown = resultMarkdown(result);
    assert.match(markdown, /standard deviation of `fill_ml` is larger/);
    assert.doesNotMatch(markdown, /\\`/);
  });
});
