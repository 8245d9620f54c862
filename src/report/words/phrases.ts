/**
 * Sentences and labels by phrase code: conclusions, procedure titles, names and notes of statistics and
 * estimates. Each message passed to `t` is a whole template with `{0}` placeholders, so it can be translated.
 */
import type { PhraseArgs } from '../../stats/result';
import type { Translate } from './translate';

export type PhraseWriter = (args: PhraseArgs, t: Translate) => string;

export const PHRASES: Readonly<Record<string, PhraseWriter>> = {};
