// Measures the worst relative error of chi-square tails and quantiles against the mpmath fixtures,
// region by region, for our implementation and (when present) jstat and stdlib-js.
// Run: npx tsx bench/distribution-accuracy.ts [--stdlib /tmp/team/stdlib/node_modules] [--with-r]
import { execFileSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import * as ours from '../src/stats/distributions/chisquare';

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
      const err = relative(fn(pt.x, pt.df), expected);
      w.add(`${side} tail, ${tailRegion(pt.df, expected)}`, err, `df=${pt.df} x=${pt.x}`);
      // The everyday corner: small df, p-values of ordinary size.
      if (side === 'lower' && pt.df <= 100 && expected >= 1e-3) w.add('lower tail, df ≤ 100, p ≥ 1e-3', err, `df=${pt.df} x=${pt.x}`);
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

interface JStatChiSquare {
  chisquare: { cdf(x: number, dof: number): number; inv(p: number, dof: number): number };
}

function jstatImplementation(): Implementation {
  // eslint-disable-next-line @typescript-eslint/no-require-imports
  const { jStat } = require('jstat') as { jStat: JStatChiSquare };
  // eslint-disable-next-line @typescript-eslint/no-require-imports
  const version = (require('jstat/package.json') as { version: string }).version;
  return {
    name: `jstat ${version}`,
    lower: (x, df) => jStat.chisquare.cdf(x, df),
    upper: (x, df) => 1 - jStat.chisquare.cdf(x, df), // jstat has no upper tail
    logUpper: (x, df) => Math.log(1 - jStat.chisquare.cdf(x, df)),
    quantile: (p, df) => jStat.chisquare.inv(p, df),
    upperQuantile: (q, df) => jStat.chisquare.inv(1 - q, df),
  };
}

/** stdlib-js, installed OUTSIDE the repository (never a dependency): pass its node_modules folder. */
function stdlibImplementation(dir: string): Implementation | null {
  if (!existsSync(join(dir, '@stdlib', 'stats-base-dists-chisquare-cdf'))) return null;
  // eslint-disable-next-line @typescript-eslint/no-require-imports
  const load = (name: string): unknown => require(join(dir, '@stdlib', name));
  const cdf = load('stats-base-dists-chisquare-cdf') as (x: number, k: number) => number;
  const quantile = load('stats-base-dists-chisquare-quantile') as (p: number, k: number) => number;
  const gammainc = load('math-base-special-gammainc') as (x: number, s: number, reg: boolean, upper: boolean) => number;
  const version = (load('stats-base-dists-chisquare-cdf/package.json') as { version: string }).version;
  return {
    name: `stdlib-js ${version}`,
    lower: cdf,
    upper: (x, df) => gammainc(x / 2, df / 2, true, true),
    logUpper: (x, df) => Math.log(gammainc(x / 2, df / 2, true, true)),
    quantile,
    upperQuantile: (q, df) => quantile(1 - q, df), // no upper quantile in stdlib-js
  };
}

/**
 * R's pchisq/qchisq (r-base-core from Debian), evaluated once for every fixture input through Rscript
 * and looked up afterwards; null when Rscript is missing.
 */
function rImplementation(): Implementation | null {
  const rscript = '/usr/bin/Rscript';
  if (!existsSync(rscript)) return null;
  const dir = mkdtempSync(join(tmpdir(), 'chisq-r-'));
  const tails = loadTailPoints();
  const quantiles = loadQuantilePoints();
  const tailCsv = tails.map((p) => `${p.x},${p.df}`).join('\n');
  const quantileCsv = quantiles.map((q) => `${q.tail},${q.p ?? 'NA'},${q.lnP ?? 'NA'},${q.df}`).join('\n');
  writeFileSync(join(dir, 'tails.csv'), `x,df\n${tailCsv}\n`);
  writeFileSync(join(dir, 'quantiles.csv'), `tail,p,lnp,df\n${quantileCsv}\n`);
  const program = `
    t <- read.csv("${dir}/tails.csv"); q <- read.csv("${dir}/quantiles.csv")
    f <- function(v) sprintf("%.17g", v)
    writeLines(paste(f(pchisq(t$x, t$df)), f(pchisq(t$x, t$df, lower.tail = FALSE)),
                     f(pchisq(t$x, t$df, lower.tail = FALSE, log.p = TRUE))), "${dir}/tails.out")
    out <- ifelse(q$tail == "lower", qchisq(q$p, q$df),
             ifelse(q$tail == "upper", qchisq(q$p, q$df, lower.tail = FALSE),
                    qchisq(q$lnp, q$df, lower.tail = FALSE, log.p = TRUE)))
    writeLines(f(out), "${dir}/quantiles.out")
    writeLines(R.version.string, "${dir}/version.out")`;
  execFileSync(rscript, ['-e', program], { stdio: ['ignore', 'ignore', 'inherit'] });
  const tailRows = readFileSync(join(dir, 'tails.out'), 'utf8').trim().split('\n').map((l) => l.split(' ').map(Number));
  const quantileRows = readFileSync(join(dir, 'quantiles.out'), 'utf8').trim().split('\n').map(Number);
  const version = readFileSync(join(dir, 'version.out'), 'utf8').trim().replace(/^R version (\S+).*/, '$1');
  const tailIndex = new Map(tails.map((p, i) => [`${p.x}|${p.df}`, tailRows[i] as number[]]));
  const quantileIndex = new Map(quantiles.map((q, i) => [`${q.tail}|${q.p ?? q.lnP}|${q.df}`, quantileRows[i] as number]));
  const tail = (x: number, df: number, column: number): number => tailIndex.get(`${x}|${df}`)?.[column] ?? NaN;
  return {
    name: `R ${version}`,
    lower: (x, df) => tail(x, df, 0),
    upper: (x, df) => tail(x, df, 1),
    logUpper: (x, df) => tail(x, df, 2),
    quantile: (p, df) => quantileIndex.get(`lower|${p}|${df}`) ?? NaN,
    upperQuantile: (q, df) => quantileIndex.get(`upper|${q}|${df}`) ?? NaN,
    upperQuantileFromLog: (lnQ, df) => quantileIndex.get(`upper-log|${lnQ}|${df}`) ?? NaN,
  };
}

function format(err: number | undefined): string {
  if (err === undefined) return '—';
  if (!Number.isFinite(err)) return 'fails (∞/NaN)';
  return err === 0 ? '0' : err.toExponential(1);
}

/** Prints one markdown table: the worst relative error per region for each implementation. */
export function printTable(impls: Implementation[]): void {
  const results = impls.map((impl) => new Map(measure(impl).map((r) => [r.region, r])));
  const regions = [...(results[0] as Map<string, RegionResult>).keys()];
  console.log(`| region | points | ${impls.map((i) => i.name).join(' | ')} |`);
  console.log(`|---|---:|${impls.map(() => '---:').join('|')}|`);
  for (const region of regions) {
    const count = (results[0] as Map<string, RegionResult>).get(region)?.count ?? 0;
    console.log(`| ${region} | ${count} | ${results.map((m) => format(m.get(region)?.worst)).join(' | ')} |`);
  }
  for (const [i, impl] of impls.entries()) {
    console.log(`\nworst points, ${impl.name}:`);
    for (const r of (results[i] as Map<string, RegionResult>).values()) console.log(`  ${r.region}: ${format(r.worst)} at ${r.at}`);
  }
}

if (require.main === module) {
  const at = process.argv.indexOf('--stdlib');
  const stdlibDir = at > 0 ? (process.argv[at + 1] as string) : '/tmp/team/stdlib/node_modules';
  const impls = [oursImplementation, jstatImplementation()];
  const r = process.argv.includes('--with-r') ? rImplementation() : null;
  if (r) impls.push(r);
  const stdlib = stdlibImplementation(stdlibDir);
  if (stdlib) impls.push(stdlib);
  else console.log(`(stdlib-js not found in ${stdlibDir}; install it there to include it)`);
  printTable(impls);
}
