/**
 * From the arguments of the numbers layer to the places of a saved test. `src/stats` knows no saved tests: its
 * errors name the function argument at fault (`{ name: 'table', at: [1, 0] }`, src/errors.ts). Here each one is
 * turned into the JSON path of the field that gave the argument (`$.table[1][0]`), or, when the data came from
 * the spec's `source`, into `$.source` and the file it names: there is no `$.table` to point at then.
 */
import { argumentText, InputError, isInputError, type ArgumentLocation } from '../errors';
import { childPath } from './json-text';
import type { SpecV1 } from './types';

/**
 * Where a procedure's arguments come from when not from the field of the same name: a field path below `$`
 * ("categories", "bayesFactor.samplingPlan"; the argument's own indices are appended), or a function giving the
 * whole JSON path (undefined: no field of the spec stands for it).
 */
export type ArgumentPlaces = Readonly<Record<string, string | ((argument: ArgumentLocation, spec: SpecV1) => string | undefined)>>;

/** What the mapping needs to know of the run. */
export interface ArgumentOrigin {
  readonly spec: SpecV1;
  readonly places: ArgumentPlaces;
  /** The fields the procedure declares: an argument that is none of them (a value derived from others) has no place. */
  readonly fields: readonly string[];
  /** Fields that hold data (the field table's `data: true`): when absent from a spec with a source, the source gave them. */
  readonly dataFields: readonly string[];
  /** How the reader described what it read ("data/trays.csv", "sql:warehouse public.orders"), once read. */
  readonly sourceDescription?: string;
}

/** The error with its argument turned into the place in the saved test; anything else unchanged. */
export function locateArgument(e: unknown, origin: ArgumentOrigin): unknown {
  if (!isInputError(e) || e.location.argument === undefined || e.location.jsonPath !== undefined) return e;
  const argument = e.location.argument;
  const { spec } = origin;
  const place = origin.places[argument.name] ?? argument.name;
  const field = typeof place === 'string' ? place.split('.')[0] : undefined;
  if (field !== undefined && spec.source !== undefined && spec[field] === undefined && origin.dataFields.includes(field)) {
    // Data read from a file or a database: the problem is in what the source holds, not in a field of the spec.
    const read = origin.sourceDescription ?? 'the source';
    return relocated(e, '$.source', spec.source.path !== undefined ? { file: spec.source.path } : {}, `${read}: `);
  }
  const jsonPath = typeof place !== 'string' ? place(argument, spec) : origin.fields.includes(field!) ? fieldPath(place, argument, spec) : undefined;
  return jsonPath === undefined ? e : relocated(e, jsonPath);
}

/**
 * The JSON path of an argument given by the field path `place`, with the argument's indices inside it. A field the
 * spec leaves out (its default was used, or it is missing) is still where the user would write it: its path alone.
 */
export function fieldPath(place: string, argument: ArgumentLocation, spec: SpecV1): string {
  const names = place.split('.');
  let value: unknown = spec;
  let path = '$';
  for (const name of names) {
    value = isObject(value) ? value[name] : undefined;
    path = childPath(path, name);
  }
  if (value === undefined) return path;
  return (argument.at ?? []).reduce<string>((p, key) => childPath(p, key), path);
}

/**
 * An argument that comes from the first of `fields` the spec gives (paired labels: "rowLabels", else
 * "columnLabels"); when it gives none (a default), the first of them.
 */
export function firstGiven(first: string, ...others: readonly string[]): (argument: ArgumentLocation, spec: SpecV1) => string {
  return (argument, spec) => fieldPath([first, ...others].find((f) => spec[f] !== undefined) ?? first, argument, spec);
}

function isObject(value: unknown): value is Readonly<Record<string, unknown>> {
  return value !== null && typeof value === 'object' && !Array.isArray(value);
}

/**
 * The error at `jsonPath`: its message starts with the path, in place of the argument it named (so a place is
 * never written twice, as in "$.method: method: …"); `within` goes between the path and the problem.
 */
export function relocated(e: InputError, jsonPath: string, extra: { readonly file?: string } = {}, within = ''): InputError {
  const argument = e.location.argument;
  const named = argument ? `${argumentText(argument)}: ` : undefined;
  const problem = named !== undefined && e.message.startsWith(named) ? e.message.slice(named.length) : e.message;
  const { argument: _argument, ...location } = e.location;
  return new InputError(`${jsonPath}: ${within}${problem}`, { ...location, ...extra, jsonPath }, e.code);
}

/**
 * `jsonPath: message`, naming the place once: a message that already starts with the path is kept, and one that
 * starts with the field the path names ("method: …" at $.method, "summary.sd: …" at $.summary.sd, "lower: …" at
 * $.equivalence.lower) has that name replaced by the path rather than repeated after it.
 */
export function withPlace(message: string, jsonPath: string): string {
  if (message.startsWith(jsonPath)) return message;
  const below = jsonPath.replace(/^\$\.?/, '');
  const last = below.slice(below.lastIndexOf('.') + 1);
  const named = [below, last, last.replace(/\[.*$/, '')].find((name) => name !== '' && message.startsWith(`${name}: `));
  return `${jsonPath}: ${named === undefined ? message : message.slice(named.length + 2)}`;
}

/** Runs `compute`, turning the arguments its errors name into places of the saved test. */
export async function withArgumentsLocated<T>(origin: () => ArgumentOrigin, compute: () => Promise<T> | T): Promise<T> {
  try {
    return await compute();
  } catch (e) {
    throw locateArgument(e, origin());
  }
}
