/** Assumption titles, explanations and alternatives by assumption id, written from its status and arguments. */
import type { AssumptionStatus, PhraseArgs } from '../../stats/result';
import type { Translate } from './translate';

export interface AssumptionWords {
  readonly title: string;
  readonly explanation: string;
  readonly alternative?: string;
}

export const ASSUMPTION_WORDS: Readonly<Record<string, (status: AssumptionStatus, args: PhraseArgs, t: Translate) => AssumptionWords>> = {};
