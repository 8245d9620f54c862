/**
 * A family of tests (a folder of saved tests, or the blocks of a markdown report) read together: each test's
 * p-value adjusted for the number of tests (Holm, Benjamini–Hochberg or Bonferroni), and which conclusions change
 * under the adjustment. Also the review flag for a recorded significant conclusion that is fragile. Pure.
 */
import { parseReportBlocks, type ReportBlock } from '../report/blocks';
import type { FamilyMembership } from '../report/evidence';
import type { FormatOptions } from '../report/format';
import { resultMarkdown } from '../report/markdown';
import { adjustPValues, type MultiplicityMethod } from '../stats/multiplicity';
import type { Result, TestResult } from '../stats/result';
import type { BlockRun } from './living';

export type { MultiplicityMethod };

const METHOD_NAME: Readonly<Record<MultiplicityMethod, string>> = { holm: 'Holm', bh: 'Benjamini–Hochberg', bonferroni: 'Bonferroni' };

export interface FamilyMember {
  readonly name: string;
  readonly result: Result;
}

export interface AdjustedMember {
  readonly name: string;
  readonly pValue: number;
  readonly adjustedPValue: number;
  readonly alpha: number;
  readonly significant: boolean;
  readonly significantAdjusted: boolean;
  /** Significant before the adjustment and not after. */
  readonly changed: boolean;
}

export interface FamilyAdjustment {
  readonly method: MultiplicityMethod;
  readonly size: number;
  readonly members: readonly AdjustedMember[];
  /** Members that are not hypothesis tests (distribution queries, power questions): not part of the family. */
  readonly leftOut: readonly string[];
}

/** Adjusts the main p-values of the tests among `members`; the family is the tests only. */
export function adjustFamily(members: readonly FamilyMember[], method: MultiplicityMethod): FamilyAdjustment {
  const tests = members.filter((m): m is { name: string; result: TestResult } => m.result.kind === 'test');
  const adjusted = adjustPValues(tests.map((m) => m.result.pValue.value), method);
  return {
    method,
    size: tests.length,
    members: tests.map((m, i) => {
      const significantAdjusted = adjusted[i] < m.result.alpha;
      return {
        name: m.name,
        pValue: m.result.pValue.value,
        adjustedPValue: adjusted[i],
        alpha: m.result.alpha,
        significant: m.result.significant,
        significantAdjusted,
        changed: m.result.significant !== significantAdjusted,
      };
    }),
    leftOut: members.filter((m) => m.result.kind !== 'test').map((m) => m.name),
  };
}

/** The family section of one member's result, as the result JSON carries it. */
export function familySection(adjustment: FamilyAdjustment, name: string): TestResult['family'] {
  const m = adjustment.members.find((x) => x.name === name);
  return m ? { size: adjustment.size, method: adjustment.method, adjustedPValue: m.adjustedPValue } : undefined;
}

const p = (x: number): string => (x < 1e-4 ? x.toExponential(2) : String(Number(x.toPrecision(3))));

export function describeFamily(adjustment: FamilyAdjustment): string {
  const lines = [`family of ${adjustment.size} test${adjustment.size === 1 ? '' : 's'}, ${METHOD_NAME[adjustment.method]} adjustment:`];
  for (const m of adjustment.members) {
    const verdict = m.changed ? `CHANGES: ${m.significant ? 'significant' : 'not significant'} → ${m.significantAdjusted ? 'significant' : 'not significant'}` : m.significantAdjusted ? 'significant' : 'not significant';
    lines.push(`  ${m.name}: p ${p(m.pValue)} → adjusted ${p(m.adjustedPValue)} at α = ${m.alpha}; ${verdict}`);
  }
  const changed = adjustment.members.filter((m) => m.changed).length;
  lines.push(`  conclusions changed by the adjustment: ${changed} of ${adjustment.size}`);
  if (adjustment.leftOut.length) lines.push(`  not tests, left out of the family: ${adjustment.leftOut.join(', ')}`);
  return lines.join('\n');
}

/** Saved tests that are not hypothesis tests, so not members of a family. */
const NOT_TESTS: ReadonlySet<string> = new Set(['distribution', 'power']);

/**
 * Where the saved test `self` sits among the hypothesis tests of its folder's saved tests (`specs`: each file's name
 * and its "test"), in file-name order; undefined when it is not a test or the only one.
 */
export function folderMembership(specs: readonly { readonly name: string; readonly test: string }[], self: string): FamilyMembership | undefined {
  const tests = specs.filter((s) => !NOT_TESTS.has(s.test)).map((s) => s.name).sort((a, b) => (a < b ? -1 : a > b ? 1 : 0));
  const position = tests.indexOf(self) + 1;
  return position > 0 && tests.length > 1 ? { position, size: tests.length, kind: 'folder' } : undefined;
}

export const DEFAULT_FRAGILITY_THRESHOLD = 2;

/** A recorded significant conclusion whose fragility index is at most the threshold; undefined when not fragile. */
export interface FragileConclusion {
  readonly index: number;
  readonly threshold: number;
  readonly message: string;
}

export function fragileConclusion(recordedSignificant: boolean | undefined, result: Result, threshold = DEFAULT_FRAGILITY_THRESHOLD): FragileConclusion | undefined {
  if (result.kind !== 'test' || !recordedSignificant || !result.fragility || result.fragility.reverse) return undefined;
  const index = result.fragility.index;
  if (index === null || index > threshold) return undefined;
  const bound = result.fragility.method === 'exact' ? '' : ' (at most; bounded search)';
  // Post-hoc comparisons: the index is for the family conclusion (some comparison significant after adjustment).
  const what = result.fragility.basis === 'post-hoc-family' ? 'the significant comparisons (after adjustment) all turn' : 'the recorded significant conclusion turns';
  return { index, threshold, message: `fragile: ${what} not significant if ${index === 1 ? 'one outcome changes' : `${index} outcomes change`}${bound} (fragility index ${index} ≤ ${threshold})` };
}

/**
 * For a living report read as a family: runs every block once, adjusts the family, and returns the adjustment and
 * a renderer for `refreshReport` that writes each block's result with its family line (a block that failed to run
 * fails again in the renderer with the same error).
 */
export async function familyRenderer(
  text: string,
  run: (block: ReportBlock) => Promise<BlockRun>,
  method: MultiplicityMethod,
  format: FormatOptions,
): Promise<{ adjustment: FamilyAdjustment; render: (block: ReportBlock) => Promise<string> }> {
  const runs = new Map<number, BlockRun | { error: unknown }>();
  for (const block of parseReportBlocks(text)) {
    if (block.problem) continue;
    try {
      runs.set(block.index, await run(block));
    } catch (error) {
      runs.set(block.index, { error });
    }
  }
  const members: FamilyMember[] = [];
  runs.forEach((r, index) => {
    if ('run' in r) members.push({ name: String(index), result: r.run.result });
  });
  const adjustment = adjustFamily(members, method);
  const render = async (block: ReportBlock): Promise<string> => {
    const r = runs.get(block.index);
    if (r === undefined) return (await run(block)).markdown;
    if ('error' in r) throw r.error;
    const result = r.run.result;
    const family = familySection(adjustment, String(block.index));
    return resultMarkdown(result.kind === 'test' && family ? { ...result, family } : result, { decimals: format.decimals, title: r.spec.title });
  };
  return { adjustment, render };
}
