import { strict as assert } from 'node:assert';
import { InputError, isInstance } from '../../../../src/errors';
import { exactIndependence, exactMultinomialFit } from '../../../../src/stats/procedures/exact';
import { monteCarloFit, monteCarloIndependence, monteCarloIndependenceInSlices, monteCarloTable, type ResamplingStatistic } from '../../../../src/stats/procedures/montecarlo';
import { Xoshiro128 } from '../../../../src/stats/random';
import { closeTo } from '../../tolerance';
import { fixture } from '../../fixtures';

interface Perm { name: string; table: number[][]; pearson: number; likelihoodRatio: number; probability: number }
interface Multi { observed: number[]; probabilities: number[]; pearson: number; likelihoodRatio: number; probability: number }
interface FisherCase { name: string; table: number[][]; pValue: number }
const R = fixture<{ rVersion: string; permutation2xc: Perm[]; multinomial: Multi[]; fisher: FisherCase[] }>('R', 'advanced');

/** A Monte Carlo p-value is checked against the exact one within ±4 of its standard errors, never against one simulated number. */
function withinFourSe(got: number, se: number, exact: number, what: string, input: unknown): void {
  const trueSe = Math.max(se, Math.sqrt((exact * (1 - exact)) / 20000), 1e-12);
  assert.ok(Math.abs(got - exact) <= 4 * trueSe, `${what}\n  input: ${JSON.stringify(input)}\n  exact: ${exact}\n  Monte Carlo: ${got}\n  Δ: ${Math.abs(got - exact)}\n  tolerance (4 SE): ${4 * trueSe}`);
}

const KEYS: Record<string, 'pearson' | 'likelihoodRatio' | 'probability'> = { pearson: 'pearson', 'likelihood-ratio': 'likelihoodRatio', probability: 'probability' };

describe('Monte Carlo p-values', () => {
  for (const c of R.permutation2xc) {
    for (const statistic of ['pearson', 'likelihood-ratio', 'probability'] as ResamplingStatistic[]) {
      it(`r×c ${c.name}, ${statistic}: within 4 SE of the exact permutation p (R enumeration)`, () => {
        const mc = monteCarloIndependence(c.table, { statistic, resamples: 20000, seed: 11 });
        withinFourSe(mc.line.pValue.value, mc.line.standardError!, c[KEYS[statistic]], `MC vs exact (${R.rVersion})`, c.table);
      });
    }
  }

  for (const c of R.multinomial) {
    for (const statistic of ['pearson', 'likelihood-ratio', 'probability'] as ResamplingStatistic[]) {
      it(`goodness of fit ${JSON.stringify(c.observed)}, ${statistic}: within 4 SE of the exact multinomial p (R dmultinom enumeration)`, () => {
        const mc = monteCarloFit(c.observed, c.probabilities, { statistic, resamples: 20000, seed: 5 });
        withinFourSe(mc.line.pValue.value, mc.line.standardError!, c[KEYS[statistic]], 'MC vs exact', c);
      });
    }
  }

  it('gives the same result for the same seed and a different one for another seed', () => {
    const t = [[12, 15, 9], [20, 11, 25]];
    const a = monteCarloIndependence(t, { statistic: 'pearson', resamples: 5000, seed: 42 });
    const b = monteCarloIndependence(t, { statistic: 'pearson', resamples: 5000, seed: 42 });
    const c = monteCarloIndependence(t, { statistic: 'pearson', resamples: 5000, seed: 43 });
    assert.deepEqual(a, b);
    assert.notEqual(a.details.extremeCount, c.details.extremeCount);
  });

  it('reports a 99% interval that contains the estimate, and the standard error', () => {
    const mc = monteCarloIndependence([[3, 1, 4], [0, 5, 2]], { statistic: 'pearson', resamples: 4000, seed: 1 });
    const i = mc.details.interval99 as { lower: number; upper: number; level: number };
    assert.equal(i.level, 0.99);
    assert.ok(i.lower < mc.line.pValue.value && mc.line.pValue.value < i.upper);
    assert.ok(mc.line.standardError! > 0);
  });

  it('gives the standard error of the reported p = (1 + x)/(B + 1): 1/(B + 1) when no resample is as extreme', () => {
    // Hand-derived: with x = 0, p = 1/(B + 1) and √(p(1 − p)/B) = 1/(B + 1) exactly; p̂ = x/B would give 0.
    // The observed table is the most extreme with these margins; drawing it (or its mirror) has chance 2/C(100, 50).
    const out = monteCarloTable([[50, 0], [0, 50]], { statistic: 'pearson', resamples: 999, seed: 3 });
    assert.equal(out.extremeCount, 0);
    assert.equal(out.pValue, 1 / 1000);
    closeTo(out.standardError, 1 / 1000, 1e-15, 'SE with x = 0', { B: 999 });
  });

  it('stops when cancelled and says so', () => {
    let calls = 0;
    const mc = monteCarloIndependence([[12, 15, 9], [20, 11, 25]], { statistic: 'pearson', resamples: 100000, seed: 1, shouldCancel: () => ++calls >= 3 });
    assert.equal(mc.details.cancelled, true);
    assert.ok((mc.details.resamples as number) < 100000);
    assert.ok(mc.notices.some((n) => n.code === 'monte-carlo-cancelled'));
  });

  it('switches from exact to Monte Carlo for a table beyond the work limit, and its p is within 4 SE of R fisher.test', () => {
    const c = R.fisher.find((f) => f.name === 't5x5_assoc')!;
    const out = exactIndependence(c.table, { workLimit: 1e5, fallback: { resamples: 20000, seed: 3 } });
    assert.ok(out.notices.some((n) => n.code === 'exact-too-large'));
    withinFourSe(out.line.pValue.value, out.line.standardError!, c.pValue, `fallback MC vs fisher.test (${R.rVersion})`, c.table);
  });

  it('run in slices, yields between them, sees a cancel, and agrees with the one-go run when not cancelled', async () => {
    const t = [[12, 15, 9], [20, 11, 25]];
    let pauses = 0;
    const pause = async (): Promise<void> => {
      pauses++;
    };
    const cancelled = await monteCarloIndependenceInSlices(t, { statistic: 'pearson', resamples: 10000, seed: 2, shouldCancel: () => pauses >= 3 }, pause);
    assert.equal(cancelled.details.cancelled, true);
    assert.equal(cancelled.details.resamples, 300);
    const sliced = await monteCarloIndependenceInSlices(t, { statistic: 'pearson', resamples: 10000, seed: 2 }, pause);
    assert.deepEqual(sliced, monteCarloIndependence(t, { statistic: 'pearson', resamples: 10000, seed: 2 }));
  });

  it('refuses totals too large for its lookup tables, with advice, instead of exhausting memory', () => {
    const big = [[6e8, 4e8], [3e8, 7e8]];
    assert.throws(() => monteCarloIndependence(big, { statistic: 'pearson', resamples: 10 }), (e: unknown) => isInstance(e, InputError) && e.code === 'too-large-for-resampling');
    assert.throws(() => exactIndependence(big), (e: unknown) => isInstance(e, InputError) && /asymptotic/.test(e.message));
  });

  it('xoshiro128** gives uniform numbers in [0, 1) with a mean near ½', () => {
    const rng = new Xoshiro128(9);
    let s = 0;
    let min = 1;
    let max = 0;
    for (let i = 0; i < 100000; i++) {
      const u = rng.next();
      s += u;
      min = Math.min(min, u);
      max = Math.max(max, u);
    }
    // Mean of 1e5 uniforms: SD 1/√(12e5) ≈ 0.00091; 5 SD.
    assert.ok(Math.abs(s / 100000 - 0.5) < 0.0046, `mean ${s / 100000}`);
    assert.ok(min >= 0 && max < 1);
  });
});

describe('exact multinomial goodness of fit', () => {
  for (const c of R.multinomial) {
    for (const statistic of ['pearson', 'likelihood-ratio', 'probability'] as ResamplingStatistic[]) {
      it(`${JSON.stringify(c.observed)} ${statistic} matches R's enumeration with dmultinom`, () => {
        const out = exactMultinomialFit(c.observed, c.probabilities, { statistic });
        const expected = c[KEYS[statistic]];
        assert.ok(Math.abs(out.line.pValue.value - expected) <= 1e-10 * Math.max(expected, 1e-300), `input ${JSON.stringify(c)}\n expected ${expected}\n got ${out.line.pValue.value}`);
      });
    }
  }

  for (const c of R.multinomial) {
    it(`${JSON.stringify(c.observed)} Cressie–Read with λ = 0 is the likelihood-ratio test (Cressie & Read 1984 define λ = 0 as G²): R's enumeration, exact and Monte Carlo`, () => {
      const exact = exactMultinomialFit(c.observed, c.probabilities, { statistic: 'cressie-read', lambda: 0 });
      const expected = c.likelihoodRatio;
      assert.ok(Math.abs(exact.line.pValue.value - expected) <= 1e-10 * Math.max(expected, 1e-300), `input ${JSON.stringify(c)}\n expected ${expected}\n got ${exact.line.pValue.value}`);
      const mc = monteCarloFit(c.observed, c.probabilities, { statistic: 'cressie-read', lambda: 0, resamples: 20000, seed: 5 });
      withinFourSe(mc.line.pValue.value, mc.line.standardError!, expected, 'MC Cressie–Read λ = 0 vs exact G²', c);
    });
  }

  it('switches to Monte Carlo when there are too many outcomes', () => {
    const out = exactMultinomialFit([30, 40, 50, 60, 70, 80], [1, 1, 1, 1, 1, 1], { statistic: 'pearson', outcomeLimit: 1000, fallback: { resamples: 2000, seed: 1 } });
    assert.equal(out.details.method, 'monte-carlo');
    assert.ok(out.notices.some((n) => n.code === 'exact-too-large'));
  });
});
