// Shared by the planner tests: the demo folder, plain settings, the Node file readers, and plan-then-run.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { aggregateFile } from '../../../src/data/file';
import { fileReaderFor } from '../../../src/data/readers';
import { parseDelimited } from '../../../src/data/delimited';
import type { Offer } from '../../../src/planner/offer';
import { plan, type Answers, type PlanSettings } from '../../../src/planner/plan';
import { runSpec } from '../../../src/savedtest/run';
import type { SpecReaders } from '../../../src/savedtest/types';
import type { TestResult } from '../../../src/stats/result';
import { ScriptedQuestions } from './fakeQuestions';

export const demo = join(__dirname, '..', '..', '..', 'demo');
export const settings: PlanSettings = { alpha: 0.05, correction: false, missingValues: ['', 'NA', 'NaN', 'null', '-'], monteCarloResamples: 2000 };
export const readers: SpecReaders = { aggregateFile: (path, request, options, control) => aggregateFile(path, request, options, { signal: control.signal }) };

/** The offer the editor makes for a demo file: what the file's reader in the reader table shows the planner. */
export async function fileOfferAt(file: string, description: string): Promise<Offer> {
  const reader = fileReaderFor(file);
  const { data, complete } = await reader.view(file, description, false);
  if (data.kind !== 'records') return { kind: 'counted', data, description };
  return { kind: 'records', records: data.records, description, file: { path: file, complete } };
}

/** The offer for a small demo CSV file, read whole. */
export function fileOffer(name: string): Offer {
  const file = join(demo, 'data', name);
  return { kind: 'records', records: parseDelimited(readFileSync(file, 'utf8'), { file }), description: `data/${name}`, file: { path: file, complete: true } };
}

export async function planAndRun(offer: Offer, answers: Record<string, string | boolean | readonly string[]>, given: Answers = {}) {
  const questions = new ScriptedQuestions(answers);
  const planned = await plan({ offer, questions, settings, given, specFolder: demo });
  const run = await runSpec(planned.spec, { readers, specPath: join(demo, 'untitled.countercheck.json'), allowedRoot: demo });
  return { planned, run, result: run.result as TestResult, questions };
}


/** The answer to the independence test's sampling-plan question (for its Bayes factor): the total fixed. */
export const TOTAL_FIXED = { 'How were the counts collected? (for the Bayes factor)': 'Only the grand total fixed' } as const;
