/**
 * Typed reads of a phrase's arguments. A missing or mistyped argument is a programming error between
 * `stats/` and `report/words`, so it throws rather than writing a sentence with a hole in it.
 */
import type { Phrase, PhraseArgs, Probability } from '../../stats/result';

function missing(key: string, expected: string, value: unknown): Error {
  return new Error(`phrase argument "${key}": expected ${expected}, found ${JSON.stringify(value)}`);
}

export function num(args: PhraseArgs, key: string): number {
  const v = args[key];
  if (typeof v !== 'number') throw missing(key, 'a number', v);
  return v;
}

export function str(args: PhraseArgs, key: string): string {
  const v = args[key];
  if (typeof v !== 'string') throw missing(key, 'a string', v);
  return v;
}

/** A string argument that may be absent. */
export function optStr(args: PhraseArgs, key: string): string | undefined {
  const v = args[key];
  if (v !== undefined && typeof v !== 'string') throw missing(key, 'a string or nothing', v);
  return v;
}

export function flag(args: PhraseArgs, key: string): boolean {
  const v = args[key];
  if (typeof v !== 'boolean') throw missing(key, 'true or false', v);
  return v;
}

export function prob(args: PhraseArgs, key: string): Probability {
  const v = args[key];
  if (typeof v !== 'object' || v === null || Array.isArray(v) || typeof (v as Probability).value !== 'number') throw missing(key, 'a probability', v);
  return v as Probability;
}

export function strings(args: PhraseArgs, key: string): readonly string[] {
  const v = args[key];
  if (!Array.isArray(v) || v.some((x) => typeof x !== 'string')) throw missing(key, 'a list of strings', v);
  return v as readonly string[];
}

/** A phrase inside a phrase (a statistic's name inside a procedure's title). */
export function inner(args: PhraseArgs, key: string): Phrase {
  const v = args[key];
  if (typeof v !== 'object' || v === null || Array.isArray(v) || typeof (v as Phrase).code !== 'string') throw missing(key, 'a phrase', v);
  return v as Phrase;
}
