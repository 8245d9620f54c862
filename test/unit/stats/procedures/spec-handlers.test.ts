// The advanced procedures reached through saved specs (runSpec, the same path as the command line and the
// editor): each answer is compared with the R or statsmodels reference for the same data.
import { strict as assert } from 'node:assert';
import { join } from 'node:path';
import { aggregateFile } from '../../../../src/data/file';
import { InputError, isInstance } from '../../../../src/errors';
import { runSpec } from '../../../../src/savedtest/run';
import type { SpecReaders } from '../../../../src/savedtest/types';
import { SpecError } from '../../../../src/savedtest/validate';
import type { PowerResult, TestResult } from '../../../../src/stats/result';
import { closeTo } from '../../tolerance';
import { fixture } from '../../fixtures';

const readers: SpecReaders = { aggregateFile: () => Promise.reject(new Error('no files in these tests')) };
const run = async (spec: Record<string, unknown>) => (await runSpec(spec, { readers })).result;

const R = fixture<{
  rVersion: string;
  fisher: { name: string; table: number[][]; pValue: number }[];
  mcnemar: { name: string; table: number[][]; exactP: number; uncorrected: number }[];
  cmh: { name: string; strata: number[][][]; corrected: number; correctedP: number; exactP: number }[];
  trend: { name: string; table: number[][]; scores: number[]; statistic: number }[];
  linearByLinear: { table: number[][]; rowScores: number[]; columnScores: number[]; statistic: number }[];
  permutation2xc: { table: number[][]; pearson: number }[];
  multinomial: { observed: number[]; probabilities: number[]; pearson: number }[];
  posthoc: { table: number[][]; pairHolm: number[] };
}>('R', 'advanced');
const SM = fixture<{ chiSquareSampleSize: { w: number; power: number; alpha: number; df: number; n: number }[] }>('statsmodels', 'advanced');
const SP = fixture<{ poissonFit: { values: number[]; binExpected: number[] } }>('statsmodels', 'advanced');

describe('specs for the advanced procedures', () => {
  it('"paired" with a 2×2 table runs McNemar (R mcnemar.test, binom.test)', async () => {
    const c = R.mcnemar[0];
    const r = (await run({ test: 'paired', table: c.table })) as TestResult;
    closeTo(r.statistic, c.uncorrected, 1e-12, 'McNemar X²', c.table);
    const exact = (await run({ test: 'paired', table: c.table, method: 'exact' })) as TestResult;
    closeTo(exact.pValue.value, c.exactP, 1e-10, 'exact p', c.table);
  });

  it('"stratified" runs CMH with correction and the exact version (R mantelhaen.test)', async () => {
    const c = R.cmh[0];
    const r = (await run({ test: 'stratified', strata: c.strata, correction: true, stratumLabels: ['a', 'b', 'c', 'd', 'e'] })) as TestResult;
    closeTo(r.statistic, c.corrected, 1e-10, 'CMH corrected', c.strata);
    assert.ok(r.details && 'homogeneity' in r.details);
    const exact = (await run({ test: 'stratified', strata: c.strata, method: 'exact' })) as TestResult;
    closeTo(exact.pValue.value, c.exactP, 1e-9, 'exact conditional p', c.strata);
    const named = (await run({ test: 'stratified', strata: c.strata, rowVariable: 'delay', columnVariable: 'response' })) as TestResult;
    assert.match(named.conclusion, /`delay` and `response`/, named.conclusion);
  });

  it('"trend" runs Cochran–Armitage for 2×k and linear-by-linear for r×c (R prop.trend.test, cor)', async () => {
    const c = R.trend[0];
    closeTo(((await run({ test: 'trend', table: c.table, scores: c.scores })) as TestResult).statistic, c.statistic, 1e-10, 'trend', c);
    const l = R.linearByLinear[0];
    closeTo(((await run({ test: 'trend', table: l.table, rowScores: l.rowScores, columnScores: l.columnScores })) as TestResult).statistic, l.statistic, 1e-10, 'M²', l);
  });

  it('"power" gives the smallest n (statsmodels GofChisquarePower, rounded up)', async () => {
    const c = SM.chiSquareSampleSize[0];
    const r = (await run({ test: 'power', target: 'independence', effectSize: c.w, df: c.df, alpha: c.alpha, power: c.power })) as PowerResult;
    assert.equal(r.n, c.n);
  });

  it('"method": "exact" on an independence spec gives Fisher–Freeman–Halton beside the asymptotic p (R fisher.test)', async () => {
    const c = R.fisher.find((f) => f.name === 'job_satisfaction')!;
    const r = (await run({ test: 'independence', table: c.table, method: 'exact' })) as TestResult;
    closeTo(r.pValue.value, c.pValue, 1e-9, 'exact p', c.table);
    assert.ok(r.otherStatistics.some((l) => l.id.endsWith('-asymptotic')));
    assert.equal(typeof r.statistic, 'number');
    assert.equal(r.df, 9);
  });

  it('without "method", small expected counts bring the exact p-value beside the chi-square one (R fisher.test)', async () => {
    const c = R.fisher.find((f) => f.name === 't3x3')!;
    const r = (await run({ test: 'independence', table: c.table })) as TestResult;
    const exact = r.otherStatistics.find((l) => l.id === 'fisher-exact')!;
    closeTo(exact.pValue.value, c.pValue, 1e-9, 'exact p beside', c.table);
    assert.ok(r.notices.some((n) => n.code === 'exact-beside'));
  });

  it('"method": "monte-carlo" with a seed is reproducible and within 4 SE of the exact permutation p (R enumeration)', async () => {
    const c = R.permutation2xc[2];
    const spec = { test: 'independence', table: c.table, method: 'monte-carlo', resamples: 20000, seed: 7 };
    const a = (await run(spec)) as TestResult;
    const b = (await run(spec)) as TestResult;
    assert.deepEqual(a.pValue, b.pValue);
    const se = a.details!.monteCarloStandardError as number;
    assert.ok(Math.abs(a.pValue.value - c.pearson) <= 4 * Math.max(se, 1e-4), `MC ${a.pValue.value} vs exact ${c.pearson}, SE ${se}`);
  });

  it('"method": "exact" on a goodness-of-fit spec enumerates the multinomial (R dmultinom enumeration)', async () => {
    const c = R.multinomial[0];
    const r = (await run({ test: 'goodness-of-fit', observed: c.observed, proportions: c.probabilities, method: 'exact' })) as TestResult;
    closeTo(r.pValue.value, c.pearson, 1e-10, 'exact multinomial p (Pearson ordering)', c);
  });

  it('"distribution-fit" fits a Poisson with λ estimated (scipy poisson.pmf expected counts)', async () => {
    const c = SP.poissonFit;
    const r = (await run({ test: 'distribution-fit', values: c.values, family: 'poisson' })) as TestResult;
    const bins = r.details!.bins as { expected: number }[];
    bins.forEach((b, k) => closeTo(b.expected, c.binExpected[k], 1e-10, `bin ${k}`, c.values));
    await assert.rejects(run({ test: 'distribution-fit', values: c.values, family: 'binomial' }), (e: unknown) => isInstance(e, SpecError) && /trials/.test(e.message));
  });

  it('"post-hoc" compares pairs of rows with Holm adjustment (R chisq.test per pair, p.adjust)', async () => {
    const c = R.posthoc;
    const r = (await run({ test: 'post-hoc', table: c.table, compare: 'rows', adjustment: 'holm' })) as TestResult;
    r.otherStatistics.forEach((l, k) => closeTo(l.pValue.value, c.pairHolm[k], 1e-10, `${l.name} Holm p`, c.table));
  });

  it('names the column and the level when a file has a level the spec does not list', async () => {
    const folder = join(__dirname, '..', '..', '..', '..', 'demo', 'advanced');
    const fileReaders: SpecReaders = { aggregateFile: (path, request, options, control) => aggregateFile(path, request, options, { signal: control.signal }) };
    const spec = { test: 'paired', source: { path: 'data/cafe-panel.csv', columns: ['before', 'after'] }, rowLabels: ['recommend', 'undecided'] };
    await assert.rejects(
      runSpec(spec, { readers: fileReaders, specPath: join(folder, 'x.countercheck.json'), allowedRoot: folder }),
      (e: unknown) => isInstance(e, InputError) && /`before`/.test(e.message) && /would not/.test(e.message),
    );
  });

  it('rejects a non-square paired table and a power spec with both n and power, naming the field', async () => {
    await assert.rejects(run({ test: 'paired', table: [[1, 2, 3], [4, 5, 6]] }), (e: unknown) => isInstance(e, SpecError) && /square/.test(e.message));
    await assert.rejects(run({ test: 'power', effectSize: 0.3, df: 2, n: 10, power: 0.8 }), (e: unknown) => isInstance(e, SpecError) && /exactly one of "n"/.test(e.message));
    await assert.rejects(run({ test: 'stratified', strata: [[[1, 2], [3, 4]]], method: 'exact', rowScores: [1] }), (e: unknown) => isInstance(e, SpecError) && /rowScores/.test(e.message));
  });
});
