// Loops over reference values computed by mpmath at 50 digits (scripts/fixtures/mpmath_distribution.py,
// mpmath version recorded in each JSON file). Tolerances are the worst relative errors measured per
// region (docs/ACCURACY.md), rounded up; the target for every region is 1e-13.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { assertAbsolute, assertRelative } from '../../tolerance';
import {
  chiSquareDensity,
  chiSquareLogLowerTail,
  chiSquareLogUpperTail,
  chiSquareLowerTail,
  chiSquareQuantile,
  chiSquareUpperQuantile,
  chiSquareUpperQuantileFromLog,
  chiSquareUpperTail,
} from '../../../../src/stats/distributions/chisquare';
import { logGamma } from '../../../../src/stats/distributions/gamma';
import {
  noncentralChiSquareLogLowerTail,
  noncentralChiSquareLogUpperTail,
  noncentralChiSquareLowerTail,
  noncentralChiSquareQuantile,
  noncentralChiSquareUpperQuantile,
  noncentralChiSquareUpperTail,
} from '../../../../src/stats/distributions/noncentral';
import {
  normalLogUpperTail,
  normalLowerTail,
  normalQuantile,
  normalUpperQuantile,
  normalUpperTail,
} from '../../../../src/stats/distributions/normal';

const DIR = join(__dirname, '..', '..', '..', 'fixtures', 'mpmath');
type Num = number | string;
function load<T>(name: string): T {
  return JSON.parse(readFileSync(join(DIR, name), 'utf8')) as T;
}
function num(v: Num): number {
  return typeof v === 'number' ? v : Number(v);
}
const NORMAL_MIN = 2.2250738585072014e-308;

/** Compares a probability: relatively where it is a normal double, absolutely (to the smallest normal) below. */
function assertProbability(got: number, expected: number, tol: number, input: string): void {
  if (expected >= NORMAL_MIN) assertRelative(got, expected, tol, input);
  else assertAbsolute(got, expected, NORMAL_MIN * tol, input);
}

/** Compares a natural log of a probability (relative, or absolute 1e-300 when it is about 0). */
function assertLog(got: number, expected: number, tol: number, input: string): void {
  if (expected === -Infinity) assertAbsolute(got === -Infinity ? 0 : 1, 0, 0, `${input} (expected −∞, got ${got})`);
  else if (Math.abs(expected) < 1e-300) assertAbsolute(got, expected, 1e-300, input);
  else assertRelative(got, expected, tol, input);
}

interface TailPoint { df: number; x: number; lower: Num; upper: Num; lnLower: Num; lnUpper: Num; density: Num }
interface QuantilePoint { df: number; tail: 'lower' | 'upper' | 'upper-log'; p?: number; lnP?: number; x: number }

// The worst relative error measured per region (docs/ACCURACY.md), rounded up, is what each region
// asserts; the target for all of them is 1e-13.
function tailTolerance(df: number, p: number): number {
  if (df < 1e4) return p >= 1e-20 ? 6e-15 : 4e-15; // measured 4.4e-15, 3.1e-15
  return p >= 1e-20 ? 3e-15 : 6e-15; // measured 2.1e-15, 4.2e-15
}
/** ln(tail): where ln(tail) is near 0 it inherits the other tail's error; far below, ~1 ulp. */
function logTailTolerance(lnP: number): number {
  return Math.abs(lnP) > 46 ? 5e-16 : 8e-15; // measured 2.1e-16, 5.7e-15
}
function quantileTolerance(tail: string, df: number, p: number): number {
  if (tail === 'upper-log') return 5e-16; // measured 2.2e-16
  if (df >= 1e4) return 5e-16; // measured 2.2e-16
  if (tail === 'upper') return p >= 1e-20 ? 8e-15 : 5e-16; // measured 5.4e-15, 2.2e-16
  // Small df: x ∝ p^(2/df), so relative errors in P grow by 2/df in x (df = 0.1 → ×20).
  return p >= 1e-20 ? 1.5e-14 : 1e-15; // measured 1.0e-14, 4.3e-16
}

describe('chi-square tails against mpmath (50 digits)', () => {
  const { points, mpmath } = load<{ points: TailPoint[]; mpmath: string }>('chisquare_tails.json');

  it(`matches both tails at ${points.length} points (mpmath ${mpmath}), df 0.1 to 1e7, down to 1e-300`, () => {
    for (const pt of points) {
      for (const side of ['lower', 'upper'] as const) {
        const expected = num(pt[side]);
        const got = side === 'lower' ? chiSquareLowerTail(pt.x, pt.df) : chiSquareUpperTail(pt.x, pt.df);
        assertProbability(got, expected, tailTolerance(pt.df, expected), `${side} tail x=${pt.x} df=${pt.df}`);
      }
    }
  });

  it('matches the density (worst measured 5.7e-15)', () => {
    for (const pt of points) {
      const expected = num(pt.density);
      assertProbability(chiSquareDensity(pt.x, pt.df), expected, 8e-15, `density x=${pt.x} df=${pt.df}`);
    }
  });

  it('matches the natural log of both tails, including tails far below 1e-308', () => {
    for (const pt of points) {
      const lnLower = num(pt.lnLower);
      const lnUpper = num(pt.lnUpper);
      assertLog(chiSquareLogLowerTail(pt.x, pt.df), lnLower, logTailTolerance(lnLower), `ln lower x=${pt.x} df=${pt.df}`);
      assertLog(chiSquareLogUpperTail(pt.x, pt.df), lnUpper, logTailTolerance(lnUpper), `ln upper x=${pt.x} df=${pt.df}`);
    }
  });
});

describe('chi-square quantiles against mpmath (50 digits)', () => {
  const { points } = load<{ points: QuantilePoint[] }>('chisquare_quantiles.json');

  it(`inverts the lower tail, the upper tail and the log upper tail at ${points.length} points`, () => {
    for (const q of points) {
      let got: number;
      let input: string;
      if (q.tail === 'upper-log') {
        got = chiSquareUpperQuantileFromLog(q.lnP as number, q.df);
        input = `upper quantile from ln q=${q.lnP} df=${q.df}`;
      } else {
        got = q.tail === 'lower' ? chiSquareQuantile(q.p as number, q.df) : chiSquareUpperQuantile(q.p as number, q.df);
        input = `${q.tail} quantile p=${q.p} df=${q.df}`;
      }
      assertRelative(got, q.x, quantileTolerance(q.tail, q.df, q.p ?? 0), input);
    }
  });
});

describe('log-gamma and the normal distribution against mpmath (50 digits)', () => {
  it('gives ln Γ(x) to 1e-15 relative (absolute near its zeros)', () => {
    const { points } = load<{ points: { x: number; logGamma: number }[] }>('gamma.json');
    for (const g of points) {
      if (Math.abs(g.logGamma) < 1) assertAbsolute(logGamma(g.x), g.logGamma, 1e-15, `lnΓ(${g.x})`);
      else assertRelative(logGamma(g.x), g.logGamma, 1e-15, `lnΓ(${g.x})`);
    }
  });

  const normal = load<{ tails: { z: number; lower: Num; upper: Num; lnUpper: Num }[]; quantiles: { p: number; z: number }[] }>(
    'normal.json',
  );

  it('gives both normal tails and the log upper tail', () => {
    for (const t of normal.tails) {
      assertProbability(normalUpperTail(t.z), num(t.upper), 4e-15, `upper z=${t.z}`);
      assertProbability(normalLowerTail(t.z), num(t.lower), 4e-15, `lower z=${t.z}`);
      if (num(t.upper) >= NORMAL_MIN) assertLog(normalLogUpperTail(t.z), num(t.lnUpper), 4e-15, `ln upper z=${t.z}`);
    }
  });

  it('inverts both normal tails (Wichura AS 241) down to 1e-300', () => {
    for (const q of normal.quantiles) {
      assertRelative(normalQuantile(q.p), q.z, 1e-15, `normal quantile p=${q.p}`);
      assertRelative(normalUpperQuantile(q.p), -q.z, 1e-15, `normal upper quantile q=${q.p}`);
    }
  });
});

describe('noncentral chi-square against mpmath (50 digits, Poisson mixture summed to 1e-55)', () => {
  const nc = load<{
    tails: { df: number; ncp: number; x: number; lower: Num; upper: Num; lnLower: Num; lnUpper: Num }[];
    quantiles: { df: number; ncp: number; tail: 'lower' | 'upper'; p: number; x: number }[];
  }>('noncentral.json');
  // Worst measured: 5.0e-15 for the tails and their logs, 2.7e-15 for quantiles (docs/ACCURACY.md).
  const TOL = 7e-15;

  it(`matches both tails and their logs at ${nc.tails.length} points, tails down to 1e-250, ncp to 2000`, () => {
    for (const t of nc.tails) {
      const input = `x=${t.x} df=${t.df} ncp=${t.ncp}`;
      assertProbability(noncentralChiSquareLowerTail(t.x, t.df, t.ncp), num(t.lower), TOL, `lower ${input}`);
      assertProbability(noncentralChiSquareUpperTail(t.x, t.df, t.ncp), num(t.upper), TOL, `upper ${input}`);
      assertLog(noncentralChiSquareLogLowerTail(t.x, t.df, t.ncp), num(t.lnLower), TOL, `ln lower ${input}`);
      assertLog(noncentralChiSquareLogUpperTail(t.x, t.df, t.ncp), num(t.lnUpper), TOL, `ln upper ${input}`);
    }
  });

  it(`inverts either tail at ${nc.quantiles.length} points`, () => {
    for (const q of nc.quantiles) {
      const got =
        q.tail === 'lower'
          ? noncentralChiSquareQuantile(q.p, q.df, q.ncp)
          : noncentralChiSquareUpperQuantile(q.p, q.df, q.ncp);
      assertRelative(got, q.x, TOL, `${q.tail} quantile p=${q.p} df=${q.df} ncp=${q.ncp}`);
    }
  });
});
