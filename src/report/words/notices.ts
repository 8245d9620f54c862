/** Notice messages by notice code, written from the arguments `stats/` gave. */
import type { PhraseArgs } from '../../stats/result';
import type { Translate } from './translate';

export const NOTICE_WORDS: Readonly<Record<string, (args: PhraseArgs, t: Translate) => string>> = {};
