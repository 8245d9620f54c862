/**
 * From what `stats/` computed to the published result: each `Phrase`, notice code and assumption id becomes
 * its sentence, written through the translator. Fields keep their order, so the JSON of a result is the same
 * bytes as when the words were written inside `stats/`.
 */
import type {
  Assumption,
  ComputedDistributionResult,
  ComputedPowerResult,
  ComputedResult,
  DistributionResult,
  PowerResult,
  ComputedTestResult,
  FoundAssumption,
  FoundEstimate,
  FoundInterval,
  FoundNotice,
  FoundStatisticLine,
  Estimate,
  Interval,
  Notice,
  Phrase,
  Result,
  StatisticLine,
  TestResult,
  Words,
} from '../../stats/result';
import { ASSUMPTION_WORDS } from './assumptions';
import { NOTICE_WORDS } from './notices';
import { PHRASES } from './phrases';
import { english, type Translate } from './translate';

/** The text of a phrase (or a sentence written before it reached `report/`). */
export function words(w: Words, t: Translate = english): string {
  if (typeof w === 'string') return w;
  const write = PHRASES[w.code];
  if (!write) throw new Error(`no wording for the phrase "${w.code}"`);
  return write(w.args ?? {}, t);
}

export function wordNotice(n: FoundNotice | Notice, t: Translate = english): Notice {
  if ('message' in n) return n;
  const write = NOTICE_WORDS[n.code];
  if (!write) throw new Error(`no wording for the notice "${n.code}"`);
  return { code: n.code, severity: n.severity, message: write(n.args ?? {}, t) };
}

export function wordAssumption(a: FoundAssumption | Assumption, t: Translate = english): Assumption {
  if ('title' in a) return a;
  const write = ASSUMPTION_WORDS[a.id];
  if (!write) throw new Error(`no wording for the assumption "${a.id}"`);
  const { title, explanation, alternative, alternativeFirst } = write(a.status, a.args ?? {}, t);
  // Some assumptions have always listed their alternative before their status; the order is kept so the JSON stays the same.
  if (alternativeFirst && alternative !== undefined) return { id: a.id, title, alternative, status: a.status, explanation };
  return { id: a.id, title, status: a.status, explanation, ...(alternative !== undefined ? { alternative } : {}) };
}

function wordInterval(i: FoundInterval, t: Translate): Interval {
  return { ...i, parameter: words(i.parameter, t), method: words(i.method, t) };
}

function wordEstimate(e: FoundEstimate, t: Translate): Estimate {
  return {
    ...e,
    name: words(e.name, t),
    ...(e.interval ? { interval: wordInterval(e.interval, t) } : {}),
    ...(e.note !== undefined ? { note: words(e.note, t) } : {}),
  } as Estimate;
}

function wordLine(l: FoundStatisticLine, t: Translate): StatisticLine {
  return { ...l, name: words(l.name, t), ...(l.note !== undefined ? { note: words(l.note, t) } : {}) } as StatisticLine;
}

/** A phrase where `details` holds one (a statistic line or an interval copied there): an object of a known code and nothing else. */
function isPhrase(value: object): value is Phrase {
  const code = (value as { code?: unknown }).code;
  return typeof code === 'string' && code in PHRASES && Object.keys(value).every((k) => k === 'code' || k === 'args');
}

/** `details` with every phrase inside written, keys in their order. */
function wordDetails(value: unknown, t: Translate): unknown {
  if (Array.isArray(value)) return value.map((v) => wordDetails(v, t));
  if (value === null || typeof value !== 'object') return value;
  if (isPhrase(value)) return words(value, t);
  return Object.fromEntries(Object.entries(value).map(([k, v]) => [k, wordDetails(v, t)]));
}

export function wordTestResult(r: ComputedTestResult, t: Translate = english): TestResult {
  return {
    ...r,
    procedure: words(r.procedure, t),
    conclusion: words(r.conclusion, t),
    otherStatistics: r.otherStatistics.map((l) => wordLine(l, t)),
    effectSizes: r.effectSizes.map((e) => wordEstimate(e, t)),
    estimates: r.estimates.map((e) => wordEstimate(e, t)),
    ...(r.confidenceInterval ? { confidenceInterval: wordInterval(r.confidenceInterval, t) } : {}),
    notices: r.notices.map((n) => wordNotice(n, t)),
    assumptions: r.assumptions.map((a) => wordAssumption(a, t)),
    ...(r.details ? { details: wordDetails(r.details, t) as Readonly<Record<string, unknown>> } : {}),
  } as TestResult;
}

/** Any computed result in words: the published shape that outputs, saved tests and the panel use. */
export function wordResult(r: ComputedTestResult, t?: Translate): TestResult;
export function wordResult(r: ComputedPowerResult, t?: Translate): PowerResult;
export function wordResult(r: ComputedDistributionResult, t?: Translate): DistributionResult;
export function wordResult(r: ComputedResult, t?: Translate): Result;
export function wordResult(r: ComputedResult, t: Translate = english): Result {
  if (r.kind === 'test') return wordTestResult(r, t);
  const notices = r.notices.map((n) => wordNotice(n, t));
  const details = 'details' in r && r.details ? { details: wordDetails(r.details, t) as Readonly<Record<string, unknown>> } : {};
  if (r.kind === 'power') return { ...r, effectSize: { ...r.effectSize, name: words(r.effectSize.name, t) }, notices, ...details };
  return { ...r, notices };
}
