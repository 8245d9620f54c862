// Measures the worst relative error of chi-square tails and quantiles against the mpmath fixtures,
// region by region, for our implementation and (when present) jstat and stdlib-js.
// Run: npx tsx bench/distribution-accuracy.ts [--stdlib /tmp/team/stdlib/node_modules]
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import * as ours from '../src/stats/chisquare';

interface TailPoint {
  df: number;
  x: number;
  lower: number;
  upper: number;
  lnLower: number | string;
  lnUpper: number | string;
}
interface QuantilePoint {
  df: number;
  tail: 'lower' | 'upper' | 'upper-log';
  p?: number;
  lnP?: number;
  x: number;
}

export interface Implementation {
  readonly name: string;
  lower?(x: number, df: number): number;
  upper?(x: number, df: number): number;
  logUpper?(x: number, df: number): number;
  quantile?(p: number, df: number): number;
  upperQuantile?(q: number, df: number): number;
  upperQuantileFromLog?(lnQ: number, df: number): number;
}

const FIXTURES = join(__dirname, '..', 'test', 'fixtures', 'mpmath');

export function loadTailPoints(): TailPoint[] {
  return JSON.parse(readFileSync(join(FIXTURES, 'chisquare_tails.json'), 'utf8')).points;
}
export function loadQuantilePoints(): QuantilePoint[] {
  return JSON.parse(readFileSync(join(FIXTURES, 'chisquare_quantiles.json'), 'utf8')).points;
}

const NORMAL_MIN = 2.2250738585072014e-308;

function relative(got: number, expected: number): number {
  if (got === expected) return 0;
  if (!Number.isFinite(got)) return Infinity;
  return Math.abs(got - expected) / Math.abs(expected);
}

export interface RegionResult {
  region: string;
  count: number;
  worst: number;
  at: string;
}

class Worst {
  readonly map = new Map<string, RegionResult>();
  add(region: string, err: number, at: string): void {
    const r = this.map.get(region) ?? { region, count: 0, worst: 0, at: '' };
    r.count++;
    if (err > r.worst || Number.isNaN(err)) {
      r.worst = Number.isNaN(err) ? Infinity : err;
      r.at = at;
    }
    this.map.set(region, r);
  }
}

/** Region names shared by the doc, the tests and the bench. */
export function tailRegion(df: number, expected: number): string {
  const size = df >= 1e4 ? 'df ≥ 1e4' : 'df < 1e4';
  const depth = expected >= 1e-20 ? 'p ≥ 1e-20' : 'p < 1e-20';
  return `${size}, ${depth}`;
}

export function measure(impl: Implementation): RegionResult[] {
  const w = new Worst();
  for (const pt of loadTailPoints()) {
    for (const side of ['lower', 'upper'] as const) {
      const expected = pt[side];
      const fn = side === 'lower' ? impl.lower : impl.upper;
      if (!fn || !(expected >= NORMAL_MIN)) continue;
      w.add(`${side} tail, ${tailRegion(pt.df, expected)}`, relative(fn(pt.x, pt.df), expected), `df=${pt.df} x=${pt.x}`);
    }
    if (impl.logUpper && typeof pt.lnUpper === 'number' && !(pt.upper >= NORMAL_MIN)) {
      w.add('ln upper tail, p < 1e-308', relative(impl.logUpper(pt.x, pt.df), pt.lnUpper), `df=${pt.df} x=${pt.x}`);
    }
  }
  const quantiles = existsSync(join(FIXTURES, 'chisquare_quantiles.json')) ? loadQuantilePoints() : [];
  for (const q of quantiles) {
    const size = q.df >= 1e4 ? 'df ≥ 1e4' : 'df < 1e4';
    if (q.tail === 'upper-log') {
      if (impl.upperQuantileFromLog)
        w.add(`quantile from ln q < ln 1e-308, ${size}`, relative(impl.upperQuantileFromLog(q.lnP as number, q.df), q.x), `df=${q.df} lnq=${q.lnP}`);
      continue;
    }
    const fn = q.tail === 'lower' ? impl.quantile : impl.upperQuantile;
    if (!fn) continue;
    const depth = (q.p as number) >= 1e-20 ? 'p ≥ 1e-20' : 'p < 1e-20';
    w.add(`${q.tail} quantile, ${size}, ${depth}`, relative(fn(q.p as number, q.df), q.x), `df=${q.df} p=${q.p}`);
  }
  return [...w.map.values()].sort((a, b) => a.region.localeCompare(b.region));
}

export const oursImplementation: Implementation = {
  name: 'Countercheck',
  lower: ours.chiSquareLowerTail,
  upper: ours.chiSquareUpperTail,
  logUpper: ours.chiSquareLogUpperTail,
  quantile: ours.chiSquareQuantile,
  upperQuantile: ours.chiSquareUpperQuantile,
  upperQuantileFromLog: ours.chiSquareUpperQuantileFromLog,
};

function print(results: RegionResult[], name: string): void {
  console.log(`\n${name}`);
  for (const r of results) console.log(`  ${r.region.padEnd(48)} n=${String(r.count).padStart(4)}  worst ${r.worst.toExponential(2)}  (${r.at})`);
}

if (require.main === module) {
  print(measure(oursImplementation), oursImplementation.name);
}
