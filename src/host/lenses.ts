// Spec files and markdown reports as first-class documents: CodeLenses and field hovers.
import * as vscode from 'vscode';
import { explanationAt, explanationMarkdown } from '../report/explanations';
import { BLOCK_INFO, parseReportBlocks } from '../report/blocks';
import { parseJsonWithLocations } from '../savedtest/json-text';
import { savedTestLens, type LensData, type SavedTestLens } from '../savedtest/lens';
import { COMMON_FIELDS, PROCEDURES, procedureFor } from '../savedtest/procedures/index';
import { tableText } from '../planner/questions';
import { COMMANDS } from './commandIds';
import { shown } from './wizard';

const t = vscode.l10n.t;

/** Where the data lives, in words. */
function dataText(data: LensData): string {
  const columns = (c: readonly string[]) => c.map((x) => `\`${x}\``).join(', ');
  switch (data.kind) {
    case 'inline':
      return data.fields.length ? t('data in the test: {0}', data.fields.join(', ')) : t('no data yet');
    case 'file':
      return data.columns.length ? t('file {0}, columns {1}', data.path, columns(data.columns)) : t('file {0}', data.path);
    case 'database': {
      const from = data.relation ?? t('a query');
      return data.columns.length ? t('database {0}: {1}, columns {2}', data.connection, from, columns(data.columns)) : t('database {0}: {1}', data.connection, from);
    }
    case 'none':
      return t('no data needed');
  }
}

/** The line above the run lenses: the procedure (from its field table) and what the test reads and sets. */
export function lensTitles(lens: SavedTestLens): { procedure: string; details: string } {
  const options = lens.options.map((o) => `${o.field} ${o.value}`);
  if (lens.moreOptions > 0) options.push(t('{0} more', lens.moreOptions));
  // The procedure's label is a field-table string, translated as the wizard's list of tests translates it.
  const procedure = shown(tableText(lens.procedure));
  return {
    procedure: lens.title ? t('{0} — {1}', procedure, lens.title) : procedure,
    details: [dataText(lens.data), ...options].join(' · '),
  };
}

export class SpecCodeLensProvider implements vscode.CodeLensProvider {
  provideCodeLenses(doc: vscode.TextDocument): vscode.CodeLens[] {
    const top = new vscode.Range(0, 0, 0, 0);
    const lenses: vscode.CodeLens[] = [];
    let lens: SavedTestLens | undefined;
    try {
      lens = savedTestLens(parseJsonWithLocations(doc.getText()).value);
    } catch {
      lens = undefined; // Text that is not JSON yet: only the run lenses (running it says what is wrong).
    }
    if (lens) {
      const words = lensTitles(lens);
      // Text only: a lens without a command is shown and not clickable.
      lenses.push(new vscode.CodeLens(top, { title: `$(beaker) ${words.procedure}`, tooltip: lens.summary, command: '' }));
      lenses.push(new vscode.CodeLens(top, { title: words.details, tooltip: lens.summary, command: '' }));
    }
    lenses.push(
      new vscode.CodeLens(top, { title: `$(play) ${t('Run')}`, command: COMMANDS.runSavedSpec, arguments: [doc.uri] }),
      new vscode.CodeLens(top, { title: `$(history) ${t('Re-run and compare')}`, command: COMMANDS.rerunAndCompare, arguments: [doc.uri] }),
      new vscode.CodeLens(top, { title: `$(preview) ${t('Open result')}`, command: COMMANDS.openSpecResult, arguments: [doc.uri] }),
    );
    return lenses;
  }
}

export class BlockCodeLensProvider implements vscode.CodeLensProvider {
  private readonly changed = new vscode.EventEmitter<void>();
  readonly onDidChangeCodeLenses = this.changed.event;

  provideCodeLenses(doc: vscode.TextDocument): vscode.CodeLens[] {
    const text = doc.getText();
    if (!text.includes(BLOCK_INFO)) return [];
    const blocks = parseReportBlocks(text);
    const lenses: vscode.CodeLens[] = [];
    for (const b of blocks) {
      const range = new vscode.Range(b.fenceLine - 1, 0, b.fenceLine - 1, 0);
      lenses.push(new vscode.CodeLens(range, { title: `$(refresh) ${b.existing ? t('Refresh result') : t('Run and write result below')}`, command: COMMANDS.refreshBlock, arguments: [doc.uri, b.index] }));
    }
    if (blocks.length > 1) lenses.push(new vscode.CodeLens(new vscode.Range(0, 0, 0, 0), { title: `$(refresh) ${t('Refresh all {0} result blocks', blocks.length)}`, command: COMMANDS.refreshAllBlocks, arguments: [doc.uri] }));
    return lenses;
  }
}

/** Explains the field under the cursor in a spec file, from the same table that makes the schema. */
export class SpecHoverProvider implements vscode.HoverProvider {
  provideHover(doc: vscode.TextDocument, position: vscode.Position): vscode.Hover | undefined {
    const range = doc.getWordRangeAtPosition(position, /"[A-Za-z$][\w$]*"\s*:/);
    if (!range) return undefined;
    const name = /"([^"]+)"/.exec(doc.getText(range))?.[1];
    if (!name) return undefined;
    const test = /"test"\s*:\s*"([^"]+)"/.exec(doc.getText())?.[1];
    const handler = test ? procedureFor(test) : undefined;
    const field = COMMON_FIELDS[name] ?? handler?.fields[name] ?? PROCEDURES.map((p) => p.fields[name]).find(Boolean);
    if (!field) return undefined;
    const md = new vscode.MarkdownString();
    md.appendMarkdown(`**${name}**${handler ? ` — ${handler.test}` : ''}\n\n`);
    // appendText would turn spaces into &nbsp;; escape markdown tokens instead so the text wraps normally.
    md.appendMarkdown(field.description.replace(/([\\`*_{}[\]<>|#])/g, '\\$1'));
    if (field.default !== undefined) md.appendMarkdown(`\n\n${t('Default')}: \`${JSON.stringify(field.default)}\``);
    if (name === 'test') md.appendMarkdown(`\n\n${PROCEDURES.map((p) => `- \`${p.test}\`: ${p.summary}`).join('\n')}`);
    return new vscode.Hover(md, range);
  }
}

/**
 * In a markdown report, explains a statistic, effect size, assumption or notice term inside a result that a
 * countercheck block wrote (between its markers), with the text the panel shows on hover.
 */
export class ResultTermHoverProvider implements vscode.HoverProvider {
  provideHover(doc: vscode.TextDocument, position: vscode.Position): vscode.Hover | undefined {
    const offset = doc.offsetAt(position);
    const inside = parseReportBlocks(doc.getText()).some((b) => b.existing !== undefined && offset >= b.resultStart && offset <= b.resultEnd);
    if (!inside) return undefined;
    const found = explanationAt(doc.lineAt(position.line).text, position.character);
    if (!found) return undefined;
    return new vscode.Hover(new vscode.MarkdownString(explanationMarkdown(found.explanation)), new vscode.Range(position.line, found.start, position.line, found.end));
  }
}
