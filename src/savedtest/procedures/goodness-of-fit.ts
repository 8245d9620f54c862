/**
 * `"test": "goodness-of-fit"`: observed counts of k categories (inline, or one categorical column of a
 * file) against expected counts, proportions or ratios (uniform when none is given).
 */
import { InputError } from '../../errors';
import { goodnessOfFit } from '../../stats/procedures/fit';
import type { TestResult } from '../../stats/result';
import { arr, field, num, obj, oneOf, ownMember, str, type SpecProblem } from '../fields';
import type { ArgumentLocation } from '../../errors';
import { fieldPath } from '../arguments';
import { childPath } from '../json-text';
import type { SpecV1 } from '../types';
import type { WeightsByLevel } from '../types';
import { defineProcedure } from './define';
import { applyMethod } from './method';
import {
  COUNT_ARRAY,
  COUNT_TEST_OPTIONS,
  VARIABLE_NAME,
  aggregateOf,
  checkLambda,
  checkSourceColumns,
  requireLength,
  requireOneOf,
  sourceField,
  MONTE_CARLO,
} from './shared';
import { BAYES_FACTOR_FIT_FIELD, EQUIVALENCE_FIT_FIELD, FRAGILITY_FIELDS } from '../evidence';

const weightsByLevel = oneOf(arr(num({ min: 0 }), { minItems: 2 }), obj({}, { additional: num({ min: 0 }) }));

export const goodnessOfFitProcedure = defineProcedure({
  test: 'goodness-of-fit',
  summary: 'Chi-square goodness of fit: do the observed counts of k categories match expected counts, proportions or ratios?',
  planning: {
    label: 'Goodness of fit of one categorical variable',
    detail: 'Observed level counts against expected proportions',
    accepts: ['category-counts', 'categorical-columns'],
    roles: ['the column'],
    variants: [
      { label: 'Goodness of fit, Monte Carlo p-value', detail: 'The same test with a p-value from random samples (small expected counts)', preset: MONTE_CARLO },
      { label: 'Goodness of fit, exact p-value', detail: 'Exact multinomial p-value (small samples)', preset: { method: 'exact' } },
    ],
  },
  arguments: { labels: 'categories', proportions: weightPath('proportions'), ratios: weightPath('ratios') },
  fields: {
    ...FRAGILITY_FIELDS,
    bayesFactor: BAYES_FACTOR_FIT_FIELD,
    equivalence: EQUIVALENCE_FIT_FIELD,
    observed: field(COUNT_ARRAY, 'Observed counts, one per category.', true),
    categories: field(arr(str(), { minItems: 2 }), 'The category labels in order: the full set of levels (a level never observed still counts, with 0).', true),
    expected: field(COUNT_ARRAY, 'Expected counts, one per category (rescaled, with a note, when their total differs from the observed total).', true),
    proportions: field(weightsByLevel, 'Expected proportions: an array in the order of the categories, or an object keyed by level. Rescaled with a note when they do not sum to 1.', true),
    ratios: field(weightsByLevel, 'Expected ratios such as 9:3:3:1: an array in the order of the categories, or an object keyed by level.', true),
    source: sourceField('The one categorical column whose levels are counted.', 1, 1),
    variable: VARIABLE_NAME('what the categories classify'),
    estimatedParameters: field(num({ integer: true, min: 0 }), 'Number of parameters of the expected distribution estimated from these data; df = k − 1 − this. Default 0.'),
    ...COUNT_TEST_OPTIONS,
  },
  validate(spec, path): readonly SpecProblem[] {
    const problems: SpecProblem[] = [];
    requireOneOf(spec, path, ['observed', 'source'], problems);
    requireOneOf(spec, path, ['expected', 'proportions', 'ratios'], problems, true);
    checkSourceColumns(spec, path, [1], 'one column (the categories)', problems);
    if (spec.observed) {
      requireLength(spec, path, 'categories', spec.observed.length, 'one per observed count', problems);
      requireLength(spec, path, 'expected', spec.observed.length, 'one per observed count', problems);
    }
    if (spec.source && spec.expected && !spec.categories) {
      problems.push({ path: childPath(path, 'expected'), message: 'with a "source", expected counts need "categories" to say which level each belongs to' });
    }
    if (spec.categories) {
      const seen = new Set<string>();
      spec.categories.forEach((c, i) => {
        if (seen.has(c)) problems.push({ path: childPath(childPath(path, 'categories'), i), message: `category "${c}" is listed twice` });
        seen.add(c);
      });
    }
    for (const key of ['proportions', 'ratios'] as const) {
      const w = spec[key];
      if (w === undefined) continue;
      if (Array.isArray(w)) {
        const k = spec.categories?.length ?? spec.observed?.length;
        if (k !== undefined) requireLength(spec, path, key, k, 'one per category', problems);
      } else {
        const keys = Object.keys(w);
        if (keys.length < 2) problems.push({ path: childPath(path, key), message: `expected at least 2 levels, found ${keys.length}` });
        if (spec.categories) {
          for (const c of spec.categories) if (!(c in w)) problems.push({ path: childPath(path, key), message: `missing level "${c}" (listed in "categories")` });
          for (const level of keys) {
            if (!spec.categories.includes(level)) problems.push({ path: childPath(childPath(path, key), level), message: `level "${level}" is not in "categories"` });
          }
        } else if (spec.observed) {
          problems.push({ path: childPath(path, key), message: `${key} keyed by level need "categories" to say which observed count is which level` });
        }
      }
    }
    checkLambda(spec, path, problems);
    return problems;
  },
  async run(spec, ctx): Promise<TestResult> {
    const keyed = keyedWeights(spec);
    let observed: readonly number[];
    let labels: readonly string[] | undefined;
    if (spec.source) {
      const column = spec.source.columns![0];
      const levels = spec.categories ?? (keyed ? Object.keys(keyed.weights) : undefined);
      const aggregate = await aggregateOf(ctx, { kind: 'categories', column, weight: spec.source.weight }, 'categories', { levels });
      ({ observed, labels } = alignToLevels(aggregate.counts.labels, aggregate.counts.counts, levels, column));
    } else {
      observed = spec.observed!;
      labels = spec.categories;
    }
    const weightsFor = (key: 'proportions' | 'ratios'): readonly number[] | undefined => {
      const w = spec[key];
      if (w === undefined) return undefined;
      if (Array.isArray(w)) {
        if (w.length !== observed.length) {
          throw new InputError(
            `$.${key}: expected ${observed.length} values, one per level found in the data (${(labels ?? []).join(', ')}); found ${w.length}. List the levels in "categories" to fix their order.`,
            { jsonPath: `$.${key}` },
            'length-mismatch',
          );
        }
        return w;
      }
      // Own members only: a level named like an inherited property ("constructor") is a missing weight, not a function.
      return labels!.map((l) => ownMember(w as Readonly<Record<string, number>>, l) as number);
    };
    return applyMethod(
      goodnessOfFit(observed, {
        labels,
        expected: spec.expected,
        proportions: weightsFor('proportions'),
        ratios: weightsFor('ratios'),
        estimatedParameters: spec.estimatedParameters,
        statistic: spec.statistic,
        lambda: spec.lambda,
        alpha: spec.alpha,
        variable: spec.variable ?? spec.source?.columns?.[0],
      }),
      spec,
      { signal: ctx.signal, onProgress: ctx.onProgress },
    );
  },
});

/**
 * Where the i-th proportion or ratio is: `$.proportions[i]`, or `$.proportions.<level>` for weights keyed by level
 * (in the order of "categories", else of the object's keys, as `run` reads them).
 */
function weightPath(key: 'proportions' | 'ratios'): (argument: ArgumentLocation, spec: SpecV1) => string | undefined {
  return (argument, spec) => {
    const weights = spec[key];
    const index = argument.at?.[0];
    if (weights === null || typeof weights !== 'object' || Array.isArray(weights) || typeof index !== 'number') return fieldPath(key, argument, spec);
    const level = ((spec.categories as readonly string[] | undefined) ?? Object.keys(weights))[index];
    return level === undefined ? childPath('$', key) : childPath(childPath('$', key), level);
  };
}

function keyedWeights(spec: { readonly proportions?: WeightsByLevel; readonly ratios?: WeightsByLevel }): { key: string; weights: Readonly<Record<string, number>> } | undefined {
  for (const key of ['proportions', 'ratios'] as const) {
    const w = spec[key];
    if (w !== undefined && !Array.isArray(w)) return { key, weights: w as Readonly<Record<string, number>> };
  }
  return undefined;
}

/**
 * Puts counts read from a file in the order of the spec's levels. A level the spec lists but the data
 * lacks counts 0; a level in the data that the spec does not list is an error naming it (silently
 * dropping observations would change the test).
 */
export function alignToLevels(
  found: readonly string[],
  counts: readonly number[],
  levels: readonly string[] | undefined,
  column: string,
): { observed: number[]; labels: string[] } {
  if (!levels) return { observed: [...counts], labels: [...found] };
  const byLevel = new Map(found.map((l, i) => [l, counts[i]]));
  const unknown = found.filter((l, i) => !levels.includes(l) && counts[i] > 0);
  if (unknown.length > 0) {
    throw new InputError(
      `column \`${column}\` has level${unknown.length > 1 ? 's' : ''} ${unknown.map((u) => `"${u}"`).join(', ')} that "categories" does not list (${levels.map((l) => `"${l}"`).join(', ')}); add ${unknown.length > 1 ? 'them' : 'it'} or fix the data`,
      { jsonPath: '$.categories', column },
      'unknown-level',
    );
  }
  return { observed: levels.map((l) => byLevel.get(l) ?? 0), labels: [...levels] };
}
