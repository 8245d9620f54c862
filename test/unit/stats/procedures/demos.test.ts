// Every demo spec in demo/advanced runs through runSpec (the path of the command line and the editor) and agrees
// with R on the same data (test/fixtures/R/advanced.json, "demos", written by scripts/fixtures/advanced.R; and for
// the fragility, Bayes factor and equivalence demos test/fixtures/R/bayesfactor.json, written by scripts/fixtures/bayesfactor.R).
import { strict as assert } from 'node:assert';
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { aggregateFile } from '../../../../src/data/file';
import { runSpec } from '../../../../src/savedtest/run';
import type { SpecReaders } from '../../../../src/savedtest/types';
import { loadSpecText } from '../../../../src/savedtest/validate';
import type { PowerResult, TestResult } from '../../../../src/stats/result';
import { closeTo } from '../../tolerance';
import { fixture } from '../../fixtures';

interface Demo { file: string; data?: unknown; statistic?: number; pValue?: number; pValueUpperBound?: number; oddsRatio?: number; n?: number; power?: number; df?: number; cellHolm?: number[]; z?: number; bayesFactorLog10?: number; equivalencePValue?: number }
const advanced = fixture<{ rVersion: string; demos: Demo[] }>('R', 'advanced');
const evidence = fixture<{ BayesFactor: string; demos: Demo[] }>('R', 'bayesfactor');
const R = { rVersion: advanced.rVersion, demos: [...advanced.demos, ...evidence.demos] };
const folder = join(__dirname, '..', '..', '..', '..', 'demo', 'advanced');
const readers: SpecReaders = { aggregateFile: (path, request, options, control) => aggregateFile(path, request, options, { signal: control.signal }) };
const files = readdirSync(folder).filter((f) => f.endsWith('.countercheck.json')).sort();

describe('demo specs of the advanced procedures (demo/advanced)', () => {
  it('has an R reference for every demo spec, and a demo for every advanced test', () => {
    assert.deepEqual(R.demos.map((d) => d.file).sort(), files);
    const tests = new Set(files.map((f) => (JSON.parse(readFileSync(join(folder, f), 'utf8')) as { test: string }).test));
    for (const t of ['paired', 'stratified', 'trend', 'power', 'distribution-fit', 'post-hoc', 'independence', 'goodness-of-fit']) assert.ok(tests.has(t), `a demo for ${t}`);
  });

  for (const file of files) {
    it(`${file} runs and agrees with R ${R.rVersion.split(' ')[2]}`, async () => {
      const text = readFileSync(join(folder, file), 'utf8');
      const { spec } = loadSpecText(text, file);
      const ref = R.demos.find((d) => d.file === file);
      assert.ok(ref, `no R reference for ${file}`);
      // An entry must carry the values this check compares: an empty or misspelt entry fails instead of passing.
      const claimed = Object.keys(ref).filter((k) => k !== 'file');
      const comparable = ['data', 'statistic', 'pValue', 'pValueUpperBound', 'oddsRatio', 'n', 'power', 'df', 'cellHolm', 'z', 'bayesFactorLog10', 'equivalencePValue'];
      assert.deepEqual(claimed.filter((k) => !comparable.includes(k)), [], `unknown fields in the R reference for ${file}`);
      const main = spec.test === 'power' ? 'power' : spec.test === 'post-hoc' ? 'cellHolm' : 'pValue';
      assert.ok(main === 'cellHolm' ? Array.isArray(ref.cellHolm) && ref.cellHolm.length > 0 : typeof ref[main] === 'number', `the R reference for ${file} lacks ${main}`);
      const data = spec.table ?? spec.strata ?? spec.values ?? spec.observed;
      if (ref.data !== undefined) assert.deepEqual(data, ref.data, 'the demo and the R script use the same data');
      const { result } = await runSpec(spec, { readers, specPath: join(folder, file), allowedRoot: folder });
      if (result.kind === 'power') {
        const p = result as PowerResult;
        if (ref.n !== undefined) assert.equal(p.n, ref.n);
        closeTo(p.power, ref.power!, 1e-9, 'power (R pchisq/qchisq)', file);
        return;
      }
      const r = result as TestResult;
      if (r.details?.method === 'monte-carlo') {
        const se = r.details.monteCarloStandardError as number;
        assert.ok(Math.abs(r.pValue.value - ref.pValue!) <= 4 * se, `Monte Carlo ${r.pValue.value} vs exact ${ref.pValue} (R enumeration), 4 SE = ${4 * se}`);
        return;
      }
      if (ref.statistic !== undefined) closeTo(r.statistic, ref.statistic, 1e-10, 'statistic', file);
      if (ref.pValue !== undefined) closeTo(r.pValue.value, ref.pValue, 1e-9, 'p-value', file);
      if (ref.df !== undefined) assert.equal(r.df, ref.df);
      if (spec.test === 'distribution-fit') {
        // The Chernoff–Lehmann upper bound of p (R pchisq on k − 1 df), which every distribution fit reports.
        assert.equal(typeof ref.pValueUpperBound, 'number', `the R reference for ${file} lacks pValueUpperBound`);
        const line = r.otherStatistics.find((l) => l.id === 'pearson-chernoff-lehmann');
        assert.ok(line, 'the Chernoff–Lehmann line');
        closeTo(line.pValue.value, ref.pValueUpperBound!, 1e-9, 'Chernoff–Lehmann upper bound of p', file);
      }
      if (ref.z !== undefined) closeTo(r.statistic, ref.z, 1e-10, 'z', file);
      if (ref.oddsRatio !== undefined) closeTo(r.estimates[0].value, ref.oddsRatio, 1e-12, 'common odds ratio', file);
      if (ref.bayesFactorLog10 !== undefined) closeTo(r.bayesFactor!.log10Bf10, ref.bayesFactorLog10, 1e-10, `log10 BF10 (R BayesFactor ${evidence.BayesFactor})`, file);
      if (ref.equivalencePValue !== undefined) closeTo(r.equivalence!.pValue, ref.equivalencePValue, 1e-9, 'equivalence p (R pchisq / pnorm)', file);
      if (ref.cellHolm !== undefined) ref.cellHolm.forEach((p, k) => closeTo(r.otherStatistics[k].pValue.value, p, 1e-9, `cell ${k} Holm p`, file));
    });
  }
});
