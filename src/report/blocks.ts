import { errorMessage } from '../errors';
import { escapeMarkdown } from './markdown';
/**
 * Living report blocks in markdown. A fenced block whose info string is `countercheck` holds a spec
 * (inline JSON, or {"spec": "path/to/test.countercheck.json"}); its result is written right below it
 * between two marker comments. Refreshing replaces only what lies between the markers: every byte
 * outside them stays as it was, and refreshing twice gives the same bytes. Pure.
 */

export const BLOCK_INFO = 'countercheck';
export const RESULT_START = '<!-- countercheck:result (generated from the block above; edits between these markers are replaced) -->';
export const RESULT_END = '<!-- countercheck:end -->';
const START_PATTERN = /^[ ]{0,3}<!-- countercheck:result\b.*-->[ \t]*$/;
const END_PATTERN = /^[ ]{0,3}<!-- countercheck:end -->[ \t]*$/;

export interface ReportBlock {
  /** 0-based position among the report's blocks. */
  readonly index: number;
  /** The block's content (the spec JSON), without the fences. */
  readonly body: string;
  /** 1-based line of the opening fence, and of the first line of the body. */
  readonly fenceLine: number;
  readonly bodyLine: number;
  /** Offset where the result region starts (the start marker) or where a new one is inserted. */
  readonly resultStart: number;
  /** Offset where the existing result region ends (after the end marker); equal to resultStart when there is none. */
  readonly resultEnd: number;
  /** The existing region text (markers included), if any. */
  readonly existing?: string;
  /** When there is no region yet: a line break to add first (the closing fence ends the file without one), or "". */
  readonly lead: string;
  /** A problem with the markers (a start marker without an end); such a block is never rewritten. */
  readonly problem?: string;
}

interface Line {
  readonly text: string;
  readonly start: number;
  /** Offset after the line's terminator. */
  readonly next: number;
}

function splitLines(text: string): Line[] {
  const lines: Line[] = [];
  let start = 0;
  while (start < text.length) {
    const nl = text.indexOf('\n', start);
    const end = nl < 0 ? text.length : nl;
    const content = text.slice(start, end).replace(/\r$/, '');
    lines.push({ text: content, start, next: nl < 0 ? text.length : nl + 1 });
    start = nl < 0 ? text.length : nl + 1;
  }
  return lines;
}

export function newlineOf(text: string): string {
  return text.includes('\r\n') ? '\r\n' : '\n';
}

/** Finds every `countercheck` block (CommonMark fences of ``` or ~~~, indented up to three spaces). */
export function parseReportBlocks(text: string): ReportBlock[] {
  const lines = splitLines(text);
  const newline = newlineOf(text);
  const blocks: ReportBlock[] = [];
  for (let i = 0; i < lines.length; i++) {
    const open = /^([ ]{0,3})(`{3,}|~{3,})[ \t]*([^`\s]*)?.*$/.exec(lines[i].text);
    if (!open) continue;
    const fence = open[2];
    const info = (open[3] ?? '').toLowerCase();
    // Find the closing fence: same character, at least as long, nothing else on the line.
    let close = i + 1;
    const closing = new RegExp(`^[ ]{0,3}${fence[0] === '`' ? '`' : '~'}{${fence.length},}[ \\t]*$`);
    while (close < lines.length && !closing.test(lines[close].text)) close++;
    if (info === BLOCK_INFO) {
      const bodyLines = lines.slice(i + 1, close);
      const body = bodyLines.map((l) => l.text).join('\n');
      const afterFence = close < lines.length ? lines[close].next : text.length;
      // An existing result: the next non-blank line is the start marker.
      let j = close + 1;
      while (j < lines.length && lines[j].text.trim() === '') j++;
      let region: { start: number; end: number; problem?: string } | undefined;
      if (j < lines.length && START_PATTERN.test(lines[j].text)) {
        let k = j + 1;
        while (k < lines.length && !END_PATTERN.test(lines[k].text) && !START_PATTERN.test(lines[k].text)) k++;
        if (k < lines.length && END_PATTERN.test(lines[k].text)) {
          region = { start: lines[j].start, end: lines[k].start + lines[k].text.length };
        } else {
          region = {
            start: lines[j].start,
            end: lines[j].start,
            problem: `line ${j + 1}: a result start marker without its end marker (${RESULT_END}); restore the end marker or delete the start marker, then refresh again`,
          };
        }
      }
      if (close >= lines.length) {
        region = { start: text.length, end: text.length, problem: `line ${i + 1}: the block has no closing fence (${fence})` };
      }
      // A closing fence on the last line without a line break needs one before the result.
      const lead = afterFence === text.length && !text.endsWith('\n') ? newline : '';
      blocks.push({
        index: blocks.length,
        body,
        fenceLine: i + 1,
        bodyLine: i + 2,
        resultStart: region ? region.start : afterFence,
        resultEnd: region ? region.end : afterFence,
        ...(region && !region.problem ? { existing: text.slice(region.start, region.end) } : {}),
        lead,
        ...(region?.problem ? { problem: region.problem } : {}),
      });
    }
    i = close;
  }
  return blocks;
}

/** The region written for a result: markers around the markdown, in the report's line endings. */
export function resultRegion(markdown: string, newline: string): string {
  const body = markdown.replace(/\r\n/g, '\n').replace(/\n+$/, '').split('\n').join(newline);
  return `${RESULT_START}${newline}${newline}${body}${newline}${newline}${RESULT_END}`;
}

export interface BlockUpdate {
  readonly block: ReportBlock;
  /** The result's markdown; undefined leaves the block as it is. */
  readonly markdown?: string;
}

/** Applies new results to the text; returns the new text and which blocks changed. */
export function rewriteReport(text: string, updates: readonly BlockUpdate[]): { text: string; changed: number[] } {
  const newline = newlineOf(text);
  const changed: number[] = [];
  let out = '';
  let at = 0;
  for (const u of [...updates].sort((a, b) => a.block.resultStart - b.block.resultStart)) {
    if (u.markdown === undefined || u.block.problem) continue;
    const region = resultRegion(u.markdown, newline);
    if (region === u.block.existing) continue;
    changed.push(u.block.index);
    out += text.slice(at, u.block.resultStart);
    out += u.block.existing === undefined ? `${u.block.lead}${newline}${region}${newline}` : region;
    at = u.block.resultEnd;
  }
  out += text.slice(at);
  return { text: out, changed };
}

export interface RefreshOutcome {
  readonly text: string;
  readonly blocks: readonly { readonly index: number; readonly fenceLine: number; readonly changed: boolean; readonly error?: string }[];
}

/**
 * Runs every block (through `render`, which returns the result's markdown or throws) and rewrites the
 * report. A block that fails gets its error written between its markers, so the report says so.
 */
export async function refreshReport(text: string, render: (block: ReportBlock) => Promise<string>): Promise<RefreshOutcome> {
  const blocks = parseReportBlocks(text);
  const updates: BlockUpdate[] = [];
  const errors = new Map<number, string>();
  for (const block of blocks) {
    if (block.problem) {
      errors.set(block.index, block.problem);
      updates.push({ block });
      continue;
    }
    try {
      updates.push({ block, markdown: await render(block) });
    } catch (e) {
      const message = errorMessage(e);
      errors.set(block.index, message);
      updates.push({ block, markdown: errorMarkdown(message) });
    }
  }
  const rewritten = rewriteReport(text, updates);
  return {
    text: rewritten.text,
    blocks: blocks.map((b) => ({ index: b.index, fenceLine: b.fenceLine, changed: rewritten.changed.includes(b.index), ...(errors.has(b.index) ? { error: errors.get(b.index) } : {}) })),
  };
}

export function errorMarkdown(message: string): string {
  // Each line of the message is escaped as inline text (a leading #, -, 1. or indentation would open a block).
  return `> **Countercheck could not run this block.**\n>\n${message
    .split(/\r\n|\r|\n/)
    .map((l) => `> ${escapeMarkdown(l)}`)
    .join('\n')}\n`;
}
