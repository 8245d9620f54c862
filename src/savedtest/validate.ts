/**
 * Validation of saved specs: every unknown field and wrong type is reported with its JSON path (and its
 * line and column when the text is known), all problems at once, before anything runs. Pure.
 */
import { InputError } from '../errors';
import { checkValue, describeFound, ownMember, unknownFieldMessage, type SpecProblem } from './fields';
import { childPath, lineColumnOf, locatePath, parseJsonWithLocations, type LocatedJson } from './json-text';
import { COMMON_FIELDS, PROCEDURES, TEST_NAMES, procedureFor } from './procedures/index';
import type { SpecV1 } from './types';

export interface LocatedProblem extends SpecProblem {
  readonly line?: number;
  readonly column?: number;
}

/** A spec that cannot run: carries every problem found. The message lists them one per line. */
export class SpecError extends InputError {
  constructor(
    readonly problems: readonly LocatedProblem[],
    readonly file?: string,
  ) {
    super(formatProblems(problems, file), { file, line: problems[0]?.line, column: problems[0]?.column === undefined ? undefined : String(problems[0].column), jsonPath: problems[0]?.path }, 'invalid-spec');
  }
}

/** "file:12:5: $.source.columns[1]: expected a string, found the number 3", one line per problem. */
export function formatProblems(problems: readonly LocatedProblem[], file?: string): string {
  const head = `${file ?? 'spec'}: ${problems.length} problem${problems.length === 1 ? '' : 's'}`;
  const lines = problems.map((p) => {
    const where = p.line !== undefined ? `${file ?? 'spec'}:${p.line}:${p.column}: ` : '';
    return `  ${where}${p.path}: ${p.message}`;
  });
  return [head, ...lines].join('\n');
}

/** Every problem of a parsed spec (empty when it is valid). `path` is the spec's own path ("$", or "$.spec" inside a block). */
export function validateSpec(value: unknown, path = '$'): SpecProblem[] {
  const problems: SpecProblem[] = [];
  if (typeof value !== 'object' || value === null || Array.isArray(value)) {
    return [{ path, message: `expected a spec object ({"test": …}), found ${describeFound(value)}` }];
  }
  const spec = value as Record<string, unknown>;
  const test = spec.test;
  const handler = typeof test === 'string' ? procedureFor(test) : undefined;
  if (test === undefined) problems.push({ path, message: `missing required field "test" (one of ${TEST_NAMES.map((t) => `"${t}"`).join(', ')})` });
  else if (!handler) {
    problems.push({ path: childPath(path, 'test'), message: `expected one of ${TEST_NAMES.map((t) => `"${t}"`).join(', ')}, found ${describeFound(test)}` });
  }
  if (spec.version !== undefined && spec.version !== 1) {
    problems.push({ path: childPath(path, 'version'), message: `this version of Countercheck reads spec version 1, found ${describeFound(spec.version)}` });
  }
  // A "__proto__" member read by a parser that assigns keys becomes the object's prototype: its fields would be
  // read through it without ever being validated. Refused wherever it is, before anything else.
  const smuggled = foreignPrototypes(spec, path);
  if (smuggled.length > 0) return [...problems, ...smuggled];
  let fieldProblems = 0;
  for (const [key, member] of Object.entries(spec)) {
    const memberPath = childPath(path, key);
    if (key === 'test' || key === 'version') continue;
    const f = ownMember(COMMON_FIELDS, key) ?? (handler ? ownMember(handler.fields, key) : undefined);
    if (f) {
      const before = problems.length;
      checkValue(f.type, member, memberPath, problems);
      fieldProblems += problems.length - before;
      continue;
    }
    fieldProblems++;
    const owners = PROCEDURES.filter((p) => ownMember(p.fields, key) !== undefined).map((p) => p.test);
    if (handler && owners.length > 0) {
      problems.push({ path: memberPath, message: `field "${key}" does not apply to the ${handler.test} test (it belongs to ${owners.map((o) => `"${o}"`).join(', ')})` });
    } else if (handler || !test) {
      problems.push({ path: memberPath, message: unknownFieldMessage(key, [...Object.keys(COMMON_FIELDS), ...Object.keys(handler?.fields ?? {})]) });
    }
    // With an unknown test, other fields cannot be judged; the "test" problem says what to fix.
  }
  // Checks across fields assume every field has its type; otherwise they would repeat the same problem.
  if (handler && fieldProblems === 0) problems.push(...handler.validate(spec as SpecV1, path));
  return problems;
}

/**
 * Every object (at any depth) whose prototype is neither Object.prototype nor null, reported at its
 * "__proto__" member.
 */
function foreignPrototypes(value: unknown, path: string, found: SpecProblem[] = []): SpecProblem[] {
  if (typeof value !== 'object' || value === null) return found;
  if (Array.isArray(value)) {
    value.forEach((item, k) => foreignPrototypes(item, childPath(path, k), found));
    return found;
  }
  const proto: unknown = Object.getPrototypeOf(value);
  if (proto !== Object.prototype && proto !== null) {
    found.push({ path: childPath(path, '__proto__'), message: 'unknown field "__proto__": a spec is plain data, and this name is not a field of any test' });
  }
  for (const [key, member] of Object.entries(value)) foreignPrototypes(member, childPath(path, key), found);
  return found;
}

/** Adds line and column to each problem when the spec's text is known. */
export function locateProblems(problems: readonly SpecProblem[], located?: LocatedJson): LocatedProblem[] {
  return problems.map((p) => {
    const at = located ? locatePath(located, p.path) : undefined;
    return at ? { ...p, ...at } : p;
  });
}

export interface LoadedSpec {
  readonly spec: SpecV1;
  readonly located: LocatedJson;
}

/**
 * Parses and validates spec text. Throws an InputError (bad JSON, with line and column) or a SpecError
 * (every problem with its JSON path, line and column).
 */
export function loadSpecText(text: string, file?: string): LoadedSpec {
  checkJsonNesting(text, file);
  const located = parseJsonWithLocations(text, file);
  const problems = validateSpec(located.value);
  if (problems.length > 0) throw new SpecError(locateProblems(problems, located), file);
  return { spec: located.value as unknown as SpecV1, located };
}

/** Validates an already-parsed spec (from a markdown block or the editor), throwing a SpecError. */
export function assertValidSpec(value: unknown, file?: string, path = '$'): SpecV1 {
  const problems = validateSpec(value, path);
  if (problems.length > 0) throw new SpecError(problems, file);
  return value as SpecV1;
}

/** Deepest nesting of arrays and objects a spec may have (the deepest field, "strata", needs 4 with the spec itself). */
export const MAX_SPEC_NESTING = 64;

/**
 * Refuses text nested deeper than MAX_SPEC_NESTING before it is parsed, with the line and column where the limit
 * is passed: one linear scan (strings skipped), so 100,000 opening brackets end in milliseconds, not in a stack overflow.
 */
export function checkJsonNesting(text: string, file?: string, maxDepth = MAX_SPEC_NESTING): void {
  let depth = 0;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (c === 34) {
      // Skip a string, with its escapes.
      for (i++; i < text.length && text.charCodeAt(i) !== 34; i++) if (text.charCodeAt(i) === 92) i++;
    } else if (c === 91 || c === 123) {
      if (++depth > maxDepth) {
        const { line, column } = lineColumnOf(text, i);
        const where = file ? `${file}:${line}:${column}` : `line ${line}, column ${column}`;
        throw new InputError(`${where}: the JSON is nested more than ${maxDepth} levels deep; a spec needs at most a few`, { file, line, column: String(column) }, 'too-deep');
      }
    } else if (c === 93 || c === 125) depth--;
  }
}