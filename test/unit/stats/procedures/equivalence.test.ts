import { strict as assert } from 'node:assert';
import { InputError, isInstance } from '../../../../src/errors';
import { fitEquivalence, varianceEquivalence } from '../../../../src/stats/procedures/equivalence';
import { Xoshiro128 } from '../../../../src/stats/random';
import { closeTo } from '../../tolerance';
import { fixture } from '../../fixtures';
import { argumentNamed } from '../argument';

interface VarCase {
  n: number; variance: number; lower: number | null; upper: number; alpha: number;
  pValue: string; upperTest: string; lowerTest?: string; intervalLower?: string; intervalUpper: string;
}
const MP = fixture<{ mpmath: string; varianceEquivalence: VarCase[] }>('mpmath', 'evidence');
const source = `mpmath ${MP.mpmath} regularized incomplete gamma (scripts/fixtures/evidence.py)`;

describe('equivalence for one variance (two one-sided chi-square tests)', () => {
  it(`p-values and the 1 − 2α interval match ${source}; the decision is "interval inside the band"`, () => {
    let equivalentCases = 0;
    for (const c of MP.varianceEquivalence) {
      const got = varianceEquivalence(c.n, c.variance, c.lower ?? undefined, c.upper, c.alpha);
      const input = { n: c.n, s2: c.variance, lower: c.lower, upper: c.upper, alpha: c.alpha };
      closeTo(got.pValue.value, Number(c.pValue), 1e-10, 'TOST p (max of the two)', input);
      closeTo(got.upperTest.value, Number(c.upperTest), 1e-10, 'p of H0 σ ≥ σU', input);
      if (c.lowerTest !== undefined) closeTo(got.lowerTest!.value, Number(c.lowerTest), 1e-10, 'p of H0 σ ≤ σL', input);
      closeTo(got.interval.upper, Number(c.intervalUpper), 1e-10, 'interval upper (σ)', input);
      if (c.intervalLower !== undefined) {
        closeTo(got.interval.lower, Number(c.intervalLower), 1e-10, 'interval lower (σ)', input);
        assert.equal(got.interval.level, 1 - 2 * c.alpha);
        assert.equal(got.form, 'equivalence');
        const inside = got.interval.lower > c.lower! && got.interval.upper < c.upper;
        assert.equal(got.equivalent, inside, `decision = interval inside the band for ${JSON.stringify(input)}`);
      } else {
        assert.equal(got.form, 'non-inferiority');
        assert.equal(got.equivalent, got.interval.upper < c.upper);
      }
      assert.equal(got.equivalent, Number(c.pValue) < c.alpha);
      if (got.equivalent) equivalentCases++;
    }
    assert.ok(equivalentCases > 0 && equivalentCases < MP.varianceEquivalence.length, 'fixtures hold both decisions');
  });

  it('refuses a band with lower ≥ upper and a limit that is not a positive σ, naming the field', () => {
    assert.throws(() => varianceEquivalence(10, 1, 2, 1), (e: unknown) => isInstance(e, InputError) && argumentNamed(e) === 'lower');
    assert.throws(() => varianceEquivalence(10, 1, -1, 1), (e: unknown) => isInstance(e, InputError) && argumentNamed(e) === 'lower');
  });
});

/** Multinomial counts by sequential conditional binomials would be faster; plain categorical draws keep it obvious. */
function drawCounts(rng: Xoshiro128, n: number, cumulative: readonly number[]): number[] {
  const counts = new Array<number>(cumulative.length).fill(0);
  for (let i = 0; i < n; i++) {
    const u = rng.next();
    let k = 0;
    while (k < cumulative.length - 1 && u >= cumulative[k]) k++;
    counts[k]++;
  }
  return counts;
}

describe("Wellek's equivalence test for goodness of fit", () => {
  it('its size at the boundary d = ε is at most α + 2 SE (seeded simulation, 1e5 samples of n = 120)', function () {
    this.timeout(60000);
    // Target (0.25, 0.25, 0.25, 0.25), ε = 0.15; true π on the boundary: distance exactly 0.15.
    const target = [0.25, 0.25, 0.25, 0.25];
    const eps = 0.15;
    const shift = eps / 2; // (+s, +s, −s, −s) has distance 2s = ε
    const pi = [0.25 + shift, 0.25 + shift, 0.25 - shift, 0.25 - shift];
    closeTo(Math.hypot(...pi.map((p, k) => p - target[k])), eps, 1e-12, 'boundary distance', pi);
    const cumulative = pi.map((_, k) => pi.slice(0, k + 1).reduce((s, x) => s + x, 0));
    const rng = new Xoshiro128(20261203);
    const samples = 100000;
    const alpha = 0.05;
    let rejections = 0;
    for (let s = 0; s < samples; s++) {
      if (fitEquivalence(drawCounts(rng, 120, cumulative), target, eps, alpha).equivalent) rejections++;
    }
    const size = rejections / samples;
    const se = Math.sqrt((alpha * (1 - alpha)) / samples);
    assert.ok(size <= alpha + 2 * se, `size ${size} > α + 2 SE = ${alpha + 2 * se}`);
    // A test that never rejects would pass the line above: the size must also be near α, not near 0.
    assert.ok(size > alpha / 2, `size ${size} is far below α: the test has almost no power at the boundary`);
  });

  it('shows equivalence for a sample close to the target and not for one far from it', () => {
    const near = fitEquivalence([252, 247, 249, 252], [0.25, 0.25, 0.25, 0.25], 0.1);
    assert.equal(near.equivalent, true);
    assert.ok(near.interval.upper < 0.1);
    const far = fitEquivalence([40, 20, 20, 20], [0.25, 0.25, 0.25, 0.25], 0.1);
    assert.equal(far.equivalent, false);
  });
});
