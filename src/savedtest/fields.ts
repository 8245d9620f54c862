/**
 * A small description language for spec fields. One description serves three purposes:
 * type-checking a spec (every problem with its JSON path), generating the JSON Schema that the
 * editor uses for completions and hovers, and documenting the field. Pure.
 */
import { childPath } from './json-text';

export type FieldType =
  | { readonly kind: 'number'; readonly integer?: boolean; readonly min?: number; readonly exclusiveMin?: number; readonly max?: number; readonly exclusiveMax?: number }
  | { readonly kind: 'string'; readonly enum?: readonly string[]; readonly nonEmpty?: boolean }
  | { readonly kind: 'boolean' }
  | { readonly kind: 'null' }
  | { readonly kind: 'array'; readonly items: FieldType; readonly minItems?: number; readonly maxItems?: number }
  | {
      readonly kind: 'object';
      readonly properties: Readonly<Record<string, Field>>;
      readonly required?: readonly string[];
      /** Type of members not listed in `properties` (a map keyed by level); absent means unknown members are errors. */
      readonly additional?: FieldType;
    }
  | { readonly kind: 'oneOf'; readonly options: readonly FieldType[] }
  /** Anything (used for the recorded result, whose shape is checked by the review code). */
  | { readonly kind: 'any' };

export interface Field<T extends FieldType = FieldType> {
  readonly type: T;
  /** One or two sentences for hovers and the schema. */
  readonly description: string;
  /** The field holds data (its canonical JSON is the fingerprint of inline data). */
  readonly data?: boolean;
  /** The value a procedure uses when the field is absent (shown in the schema, pre-filled in the editor's questions). */
  readonly default?: unknown;
}

export interface SpecProblem {
  /** JSON path, e.g. "$.source.columns[1]". */
  readonly path: string;
  readonly message: string;
}

// Shorthands so that field tables stay readable. Each keeps its literal type (an enum's values, an array's
// items, an object's members), so that `SpecOf` below derives the TypeScript type of a saved test from its table.
type NumberOptions = Omit<Extract<FieldType, { kind: 'number' }>, 'kind'>;
export const num = (o: NumberOptions = {}) => ({ kind: 'number' as const, ...o });
export function str(): { readonly kind: 'string' };
export function str<const E extends readonly string[]>(o: { readonly enum: E; readonly nonEmpty?: boolean }): { readonly kind: 'string'; readonly enum: E; readonly nonEmpty?: boolean };
export function str(o: { readonly nonEmpty?: boolean }): { readonly kind: 'string'; readonly nonEmpty?: boolean };
export function str(o: { readonly enum?: readonly string[]; readonly nonEmpty?: boolean } = {}): FieldType {
  return { kind: 'string', ...o };
}
export const bool = { kind: 'boolean' } as const;
export const nul = { kind: 'null' } as const;
export const any = { kind: 'any' } as const;
export const arr = <I extends FieldType>(items: I, o: { minItems?: number; maxItems?: number } = {}) => ({ kind: 'array' as const, items, ...o });
export const oneOf = <const O extends readonly FieldType[]>(...options: O) => ({ kind: 'oneOf' as const, options });
export const obj = <P extends Readonly<Record<string, Field>>, const R extends readonly (keyof P & string)[] = [], A extends FieldType | undefined = undefined>(
  properties: P,
  o: { required?: R; additional?: A } = {},
) => ({ kind: 'object' as const, properties, ...(o as { required?: R; additional?: A }) });
export const field = <T extends FieldType>(type: T, description: string, data?: boolean): Field<T> => (data ? { type, description, data } : { type, description });

/** The same field with the value used when it is absent; the value is typed by the field. */
export const withDefault = <T extends FieldType>(f: Field<T>, value: ValueOf<T>): Field<T> => ({ ...f, default: value });

/** The TypeScript type of a value that a field type accepts. */
export type ValueOf<T> = [FieldType] extends [T] ? unknown : KnownValueOf<T>;

type KnownValueOf<T> = T extends { readonly kind: 'number' }
  ? number
  : T extends { readonly kind: 'string'; readonly enum: readonly (infer E)[] }
    ? E
    : T extends { readonly kind: 'string' }
      ? string
      : T extends { readonly kind: 'boolean' }
        ? boolean
        : T extends { readonly kind: 'null' }
          ? null
          : T extends { readonly kind: 'array'; readonly items: infer I }
            ? readonly ValueOf<I>[]
            : T extends { readonly kind: 'oneOf'; readonly options: readonly (infer O)[] }
              ? ValueOf<O>
              : T extends { readonly kind: 'object'; readonly properties: infer P }
                ? ObjectOf<P, T extends { readonly required?: infer R } ? (R extends readonly string[] ? R[number] : never) : never> &
                    (T extends { readonly additional?: infer A } ? ([A] extends [FieldType] ? Readonly<Record<string, ValueOf<A>>> : unknown) : unknown)
                : unknown;

type ObjectOf<P, R extends string> = string extends keyof P ? Readonly<Record<string, unknown>> : KnownObjectOf<P, R>;

type KnownObjectOf<P, R extends string> = {
  readonly [K in keyof P as K extends R ? K : never]-?: P[K] extends Field<infer T> ? ValueOf<T> : unknown;
} & {
  readonly [K in keyof P as K extends R ? never : K]?: P[K] extends Field<infer T> ? ValueOf<T> : unknown;
};

/** The TypeScript type of the fields a table describes, each optional (the handler's `validate` says which are required together). */
export type FieldsValue<F> = string extends keyof F ? Readonly<Record<string, unknown>> : { readonly [K in keyof F]?: F[K] extends Field<infer T> ? ValueOf<T> : unknown };

/** How a value looks, for messages: "a string (\"abc\")", "an array of 3 items", "null". */
export function describeFound(value: unknown): string {
  if (value === null) return 'null';
  if (Array.isArray(value)) return `an array of ${value.length} item${value.length === 1 ? '' : 's'}`;
  switch (typeof value) {
    case 'string':
      return `the string ${JSON.stringify(value.length > 40 ? value.slice(0, 37) + '…' : value)}`;
    case 'number':
      return `the number ${value}`;
    case 'boolean':
      return `${value}`;
    case 'object':
      return 'an object';
    default:
      return typeof value;
  }
}

/** What a type expects, for messages: "a number > 0", "one of \"pearson\", \"likelihood-ratio\"". */
export function describeExpected(type: FieldType): string {
  switch (type.kind) {
    case 'number': {
      const bounds: string[] = [];
      if (type.min !== undefined) bounds.push(`≥ ${type.min}`);
      if (type.exclusiveMin !== undefined) bounds.push(`> ${type.exclusiveMin}`);
      if (type.max !== undefined) bounds.push(`≤ ${type.max}`);
      if (type.exclusiveMax !== undefined) bounds.push(`< ${type.exclusiveMax}`);
      return `${type.integer ? 'an integer' : 'a number'}${bounds.length ? ' ' + bounds.join(' and ') : ''}`;
    }
    case 'string':
      return type.enum ? `one of ${type.enum.map((e) => JSON.stringify(e)).join(', ')}` : type.nonEmpty ? 'a non-empty string' : 'a string';
    case 'boolean':
      return 'true or false';
    case 'null':
      return 'null';
    case 'array':
      return `an array (each item ${describeExpected(type.items)})`;
    case 'object':
      return 'an object';
    case 'oneOf':
      return type.options.map(describeExpected).join(' or ');
    case 'any':
      return 'any value';
  }
}

function matchesShallow(type: FieldType, value: unknown): boolean {
  switch (type.kind) {
    case 'number':
      return typeof value === 'number';
    case 'string':
      return typeof value === 'string';
    case 'boolean':
      return typeof value === 'boolean';
    case 'null':
      return value === null;
    case 'array':
      return Array.isArray(value);
    case 'object':
      return typeof value === 'object' && value !== null && !Array.isArray(value);
    case 'oneOf':
      return type.options.some((o) => matchesShallow(o, value));
    case 'any':
      return true;
  }
}

/** Type-checks a value against a description, collecting every problem (never stops at the first). */
export function checkValue(type: FieldType, value: unknown, path: string, problems: SpecProblem[]): void {
  const bad = (): void => {
    problems.push({ path, message: `expected ${describeExpected(type)}, found ${describeFound(value)}` });
  };
  switch (type.kind) {
    case 'number': {
      if (typeof value !== 'number' || !Number.isFinite(value)) return bad();
      if (type.integer && !Number.isInteger(value)) return bad();
      if (type.min !== undefined && value < type.min) return bad();
      if (type.exclusiveMin !== undefined && value <= type.exclusiveMin) return bad();
      if (type.max !== undefined && value > type.max) return bad();
      if (type.exclusiveMax !== undefined && value >= type.exclusiveMax) return bad();
      return;
    }
    case 'string':
      if (typeof value !== 'string') return bad();
      if (type.enum && !type.enum.includes(value)) return bad();
      if (type.nonEmpty && value.trim() === '') return bad();
      return;
    case 'boolean':
      if (typeof value !== 'boolean') bad();
      return;
    case 'null':
      if (value !== null) bad();
      return;
    case 'array':
      if (!Array.isArray(value)) return bad();
      if (type.minItems !== undefined && value.length < type.minItems) {
        problems.push({ path, message: `expected at least ${type.minItems} item${type.minItems === 1 ? '' : 's'}, found ${value.length}` });
      }
      if (type.maxItems !== undefined && value.length > type.maxItems) {
        problems.push({ path, message: `expected at most ${type.maxItems} item${type.maxItems === 1 ? '' : 's'}, found ${value.length}` });
      }
      value.forEach((item, k) => checkValue(type.items, item, childPath(path, k), problems));
      return;
    case 'object': {
      if (typeof value !== 'object' || value === null || Array.isArray(value)) return bad();
      const record = value as Record<string, unknown>;
      for (const [key, member] of Object.entries(record)) {
        const known = ownMember(type.properties, key);
        if (known) checkValue(known.type, member, childPath(path, key), problems);
        else if (type.additional) checkValue(type.additional, member, childPath(path, key), problems);
        else problems.push({ path: childPath(path, key), message: unknownFieldMessage(key, Object.keys(type.properties)) });
      }
      for (const key of type.required ?? []) {
        if (!Object.prototype.hasOwnProperty.call(record, key)) problems.push({ path, message: `missing required field "${key}"` });
      }
      return;
    }
    case 'oneOf': {
      // Prefer the option whose outer shape matches, so that `[1, "x"]` against number | number[]
      // reports the bad item rather than "expected a number or an array".
      const candidates = type.options.filter((o) => matchesShallow(o, value));
      if (candidates.length === 0) return bad();
      let best: SpecProblem[] | undefined;
      for (const option of candidates) {
        const local: SpecProblem[] = [];
        checkValue(option, value, path, local);
        if (local.length === 0) return;
        if (!best || local.length < best.length) best = local;
      }
      problems.push(...(best ?? []));
      return;
    }
    case 'any':
      return;
  }
}

/** "unknown field "colums" (did you mean "columns"?)" */
export function unknownFieldMessage(key: string, known: readonly string[]): string {
  const near = closest(key, known);
  return `unknown field "${key}"${near ? ` (did you mean "${near}"?)` : ''}`;
}

function closest(word: string, candidates: readonly string[]): string | undefined {
  let best: string | undefined;
  let bestDistance = Infinity;
  for (const c of candidates) {
    const d = editDistance(word.toLowerCase(), c.toLowerCase());
    if (d < bestDistance) {
      bestDistance = d;
      best = c;
    }
  }
  return bestDistance <= Math.max(1, Math.floor(word.length / 3)) ? best : undefined;
}

/** Levenshtein distance (small strings only). */
function editDistance(a: string, b: string): number {
  let previous = Array.from({ length: b.length + 1 }, (_, j) => j);
  for (let i = 1; i <= a.length; i++) {
    const current = [i];
    for (let j = 1; j <= b.length; j++) {
      current[j] = Math.min(previous[j] + 1, current[j - 1] + 1, previous[j - 1] + (a[i - 1] === b[j - 1] ? 0 : 1));
    }
    previous = current;
  }
  return previous[b.length];
}

/** JSON Schema (draft-07) for a field type. */
export function toJsonSchema(type: FieldType, description?: string): Record<string, unknown> {
  const withDescription = (s: Record<string, unknown>): Record<string, unknown> => (description ? { description, ...s } : s);
  switch (type.kind) {
    case 'number': {
      const s: Record<string, unknown> = { type: type.integer ? 'integer' : 'number' };
      if (type.min !== undefined) s.minimum = type.min;
      if (type.exclusiveMin !== undefined) s.exclusiveMinimum = type.exclusiveMin;
      if (type.max !== undefined) s.maximum = type.max;
      if (type.exclusiveMax !== undefined) s.exclusiveMaximum = type.exclusiveMax;
      return withDescription(s);
    }
    case 'string': {
      const s: Record<string, unknown> = { type: 'string' };
      if (type.enum) s.enum = [...type.enum];
      if (type.nonEmpty) s.minLength = 1;
      return withDescription(s);
    }
    case 'boolean':
      return withDescription({ type: 'boolean' });
    case 'null':
      return withDescription({ type: 'null' });
    case 'array': {
      const s: Record<string, unknown> = { type: 'array', items: toJsonSchema(type.items) };
      if (type.minItems !== undefined) s.minItems = type.minItems;
      if (type.maxItems !== undefined) s.maxItems = type.maxItems;
      return withDescription(s);
    }
    case 'object': {
      const properties: Record<string, unknown> = {};
      for (const [key, f] of Object.entries(type.properties)) properties[key] = toJsonSchema(f.type, f.description);
      const s: Record<string, unknown> = { type: 'object', properties, additionalProperties: type.additional ? toJsonSchema(type.additional) : false };
      if (type.required?.length) s.required = [...type.required];
      return withDescription(s);
    }
    case 'oneOf':
      return withDescription({ anyOf: type.options.map((o) => toJsonSchema(o)) });
    case 'any':
      return withDescription({});
  }
}

/** `table[key]` when it is the table's own member: never a name every object inherits (constructor, toString…). */
export function ownMember<T>(table: Readonly<Record<string, T>>, key: string): T | undefined {
  return Object.prototype.hasOwnProperty.call(table, key) ? table[key] : undefined;
}
