// The distribution lookup with "noncentrality": tails, density and critical values of the noncentral chi-square,
// against R's pchisq, dchisq and qchisq with ncp (scripts/fixtures/noncentral_lookup.R; version in the fixture).
import { strict as assert } from 'node:assert';
import { runSpec } from '../../../src/savedtest/run';
import { validateSpec } from '../../../src/savedtest/validate';
import type { DistributionResult } from '../../../src/stats/result';
import { closeTo } from '../tolerance';
import { fixture } from '../fixtures';

interface Point { df: number; ncp: number; x: number; lower: number; upper: number; density: number }
interface Critical { df: number; ncp: number; p: number; lower: number; upper: number }
const R = fixture<{ rVersion: string; points: Point[]; critical: Critical[] }>('R', 'noncentral-lookup');
const readers = { aggregateFile: async (): Promise<never> => assert.fail('no file') };

async function lookup(spec: object): Promise<DistributionResult> {
  return (await runSpec({ test: 'distribution', ...spec }, { readers, specPath: '/w/s.countercheck.json' })).result as DistributionResult;
}

describe(`distribution lookup with noncentrality, against R ${R.rVersion}`, () => {
  assert.ok(R.points.length >= 20 && R.critical.length >= 20, 'fixture has its cases');
  for (const c of R.points) {
    it(`tails and density at x = ${c.x.toPrecision(6)}, df = ${c.df}, noncentrality = ${c.ncp}`, async () => {
      for (const k of ['df', 'ncp', 'x', 'lower', 'upper', 'density'] as const) assert.equal(typeof c[k], 'number', `fixture lacks ${k}`);
      const r = await lookup({ df: c.df, noncentrality: c.ncp, x: c.x });
      assert.equal(r.noncentrality, c.ncp);
      const p = r.points[0];
      closeTo(p.lower.value, c.lower, 1e-9, 'P(X ≤ x) (R pchisq)', c);
      closeTo(p.upper.value, c.upper, 1e-9, 'P(X > x) (R pchisq, lower.tail = FALSE)', c);
      closeTo(p.density, c.density, 1e-9, 'density (R dchisq)', c);
    });
  }
  for (const c of R.critical) {
    it(`critical values at p = ${c.p}, df = ${c.df}, noncentrality = ${c.ncp}`, async () => {
      for (const k of ['df', 'ncp', 'p', 'lower', 'upper'] as const) assert.equal(typeof c[k], 'number', `fixture lacks ${k}`);
      const r = await lookup({ df: c.df, noncentrality: c.ncp, p: c.p });
      // R's qchisq with ncp stops its search at a relative 1e-11 or so: compared to 1e-8.
      closeTo(r.critical[0].lower, c.lower, 1e-8, 'lower critical value (R qchisq)', c);
      closeTo(r.critical[0].upper, c.upper, 1e-8, 'upper critical value (R qchisq, lower.tail = FALSE)', c);
    });
  }
  it('validates "noncentrality" as a number ≥ 0, and keeps 0 as the central distribution', async () => {
    assert.ok(validateSpec({ test: 'distribution', df: 3, x: 1, noncentrality: -1 }).some((p) => p.path === '$.noncentrality'));
    assert.ok(validateSpec({ test: 'distribution', df: 3, x: 1, noncentrality: 'a' }).some((p) => p.path === '$.noncentrality'));
    const central = await lookup({ df: 4, x: 161.13, noncentrality: 0 });
    // Upper tail of 161.13 at df 4: mpmath gammainc(2, 80.565, ∞, regularized) = 8.36698337371955432e-34.
    closeTo(central.points[0].upper.value, 8.36698337371955432e-34, 1e-12, 'central upper tail', 161.13);
  });
});
