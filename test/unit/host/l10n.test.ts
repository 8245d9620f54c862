// Translatable strings. Runtime: every user-visible string in src/host goes through vscode.l10n.t, the result
// sentences of src/report/words through the translator `t` the host fills with vscode.l10n.t, and
// l10n/bundle.l10n.json lists exactly the messages the code passes to either (UPDATE_L10N=1 rewrites the bundle).
// The planner's words (src/planner, shown by the wizard through vscode.l10n.t) are in the bundle too: the literal
// templates of its `text('…')` calls and the strings of the procedures' field tables it shows (`tableText`).
// Contributions: every %key% in package.json has its English text in package.nls.json, and every entry is used.
import { fieldOf } from '../../../src/planner/ask';
import { strict as assert } from 'node:assert';
import { readdirSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import { join, relative } from 'node:path';
import * as ts from 'typescript';
import { PROCEDURES } from '../../../src/savedtest/procedures/index';

const root = join(__dirname, '..', '..', '..');

function tsFiles(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const path = join(dir, name);
    if (statSync(path).isDirectory()) return tsFiles(path);
    return name.endsWith('.ts') ? [path] : [];
  });
}

const parse = (file: string) => ts.createSourceFile(file, readFileSync(file, 'utf8'), ts.ScriptTarget.Latest, true);
const sources = tsFiles(join(root, 'src', 'host')).map(parse);
const plannerSources = tsFiles(join(root, 'src', 'planner')).map(parse);
/**
 * The report layer's wording: each function takes the translator as `t` (src/report/words/translate.ts), and so do
 * the panel's captions and the headline the panel shows.
 */
const wordings = [...tsFiles(join(root, 'src', 'report', 'words')), join(root, 'src', 'report', 'panel.ts'), join(root, 'src', 'report', 'headline.ts')].map(parse);

/** The one translation call whose message is not a literal: the wizard's rendering of the planner's templates. */
function isPlannerRendering(node: ts.CallExpression): boolean {
  let f: ts.Node | undefined = node;
  while (f && !ts.isFunctionDeclaration(f)) f = f.parent;
  return relative(root, node.getSourceFile().fileName) === join('src', 'host', 'wizard.ts') && f?.name?.text === 'shown' && node.arguments[0]?.getText() === 's.message';
}

/** The planner's templates: `text('…')` calls in src/planner (a message that is not a literal is listed as dynamic). */
function plannerMessages(): { messages: Set<string>; dynamic: string[]; verbatimWords: string[] } {
  const messages = new Set<string>();
  const dynamic: string[] = [];
  const verbatimWords: string[] = [];
  for (const source of plannerSources) {
    walk(source, (node) => {
      if (!ts.isCallExpression(node) || !ts.isIdentifier(node.expression)) return;
      const first = node.arguments[0];
      const where = `${relative(root, source.fileName)}:${source.getLineAndCharacterOfPosition(node.getStart()).line + 1}: ${node.getText().slice(0, 70)}`;
      if (node.expression.text === 'text') {
        if (first && (ts.isStringLiteral(first) || ts.isNoSubstitutionTemplateLiteral(first))) messages.add(first.text);
        else dynamic.push(where);
      }
      // Verbatim text is for words from the data; English written there would never be translated.
      if (node.expression.text === 'verbatim' && first && hasWords(first)) verbatimWords.push(where);
    });
  }
  return { messages, dynamic, verbatimWords };
}

/** The field-table strings the planner shows: planning labels, details, roles, question titles, choice labels and details, and the prompts (field descriptions, a dotted name's member) of the questions. */
function tableMessages(): Set<string> {
  const messages = new Set<string>();
  for (const p of PROCEDURES) {
    const planning = p.planning;
    if (!planning) continue;
    for (const s of [planning.label, planning.detail, ...(planning.roles ?? []), ...(planning.variants ?? []).flatMap((v) => [v.label, v.detail])]) messages.add(s);
    for (const q of planning.questions ?? []) {
      messages.add(q.title);
      messages.add(fieldOf(p.test, q.field).description);
      for (const label of [...Object.values(q.choiceLabels ?? {}), ...Object.values(q.choiceDetails ?? {})]) messages.add(label);
    }
  }
  return messages;
}

/** `vscode.l10n.t(…)`, or `t(…)` where the file binds `const t = vscode.l10n.t` or is a wording file of report/words. */
function isL10nCall(node: ts.Node): node is ts.CallExpression {
  if (!ts.isCallExpression(node)) return false;
  const callee = node.expression.getText();
  const file = node.getSourceFile();
  return callee === 'vscode.l10n.t' || (callee === 't' && (wordings.includes(file) || /const t = vscode\.l10n\.t;/.test(file.text)));
}

function walk(node: ts.Node, visit: (n: ts.Node) => void): void {
  visit(node);
  ts.forEachChild(node, (child) => walk(child, visit));
}

/** Text a reader would see: letters outside `${…}` substitutions and `$(icon)` names. */
function hasWords(literal: ts.Node): boolean {
  let text = '';
  if (ts.isStringLiteral(literal) || ts.isNoSubstitutionTemplateLiteral(literal)) text = literal.text;
  else if (ts.isTemplateExpression(literal)) text = [literal.head.text, ...literal.templateSpans.map((s) => s.literal.text)].join(' ');
  else return false;
  return /\p{L}{2,}/u.test(text.replace(/\$\([a-z-~]+\)/g, ''));
}

const SHOWN_PROPERTIES = new Set(['title', 'placeHolder', 'prompt', 'label', 'detail', 'description', 'tooltip', 'validationMessage']);

describe('translatable strings', () => {
  it('every user-visible string literal in src/host goes through vscode.l10n.t', () => {
    const bypassing: string[] = [];
    for (const source of sources) {
      walk(source, (node) => {
        let shown: ts.Node | undefined;
        if (ts.isCallExpression(node) && /\.show(Information|Warning|Error)Message$|\.setStatusBarMessage$/.test(node.expression.getText())) shown = node.arguments[0];
        if (ts.isPropertyAssignment(node) && SHOWN_PROPERTIES.has(node.name.getText())) shown = node.initializer;
        if (shown && hasWords(shown)) {
          const { line } = source.getLineAndCharacterOfPosition(shown.getStart());
          bypassing.push(`${relative(root, source.fileName)}:${line + 1}: ${shown.getText().slice(0, 80)}`);
        }
      });
    }
    assert.deepEqual(bypassing, []);
  });

  it('l10n/bundle.l10n.json holds exactly the messages passed to vscode.l10n.t', () => {
    const messages = new Set<string>();
    const dynamic: string[] = [];
    for (const source of [...sources, ...wordings]) {
      walk(source, (node) => {
        if (!isL10nCall(node)) return;
        const first = node.arguments[0];
        if (first && (ts.isStringLiteral(first) || ts.isNoSubstitutionTemplateLiteral(first))) messages.add(first.text);
        else if (!isPlannerRendering(node)) dynamic.push(`${relative(root, source.fileName)}: ${node.getText().slice(0, 60)}`);
      });
    }
    assert.deepEqual(dynamic, [], 'a message must be a literal so it can be translated');
    for (const m of [...plannerMessages().messages, ...tableMessages()]) messages.add(m);
    const bundle = Object.fromEntries([...messages].sort().map((m) => [m, m]));
    const file = join(root, 'l10n', 'bundle.l10n.json');
    if (process.env.UPDATE_L10N) writeFileSync(file, JSON.stringify(bundle, null, 2) + '\n');
    assert.deepEqual(JSON.parse(readFileSync(file, 'utf8')), bundle, 'stale bundle: run UPDATE_L10N=1 npx mocha test/unit/host/l10n.test.ts');
    assert.ok(messages.size > 50, `only ${messages.size} messages found`);
    assert.ok(messages.has('Chi-square test for one variance'), 'the result sentences of src/report/words are in the bundle');
  });

  it("every word the planner shows is a literal template or a field table's string, and each is in the bundle", () => {
    const { messages, dynamic, verbatimWords } = plannerMessages();
    assert.deepEqual(dynamic, [], 'text() needs a literal template (use tableText for a field-table string, listOf for a list)');
    assert.deepEqual(verbatimWords, [], 'verbatim() is for words from the data; write English with text()');
    assert.ok(messages.has('Which test?') && messages.size > 30, `only ${messages.size} planner templates found`);
    const bundle = JSON.parse(readFileSync(join(root, 'l10n', 'bundle.l10n.json'), 'utf8')) as Record<string, string>;
    const missing = [...messages, ...tableMessages()].filter((m) => !(m in bundle));
    assert.deepEqual(missing, [], 'planner questions missing from l10n/bundle.l10n.json: run UPDATE_L10N=1 npx mocha test/unit/host/l10n.test.ts');
  });

  it('package.json takes its contributed strings from package.nls.json', () => {
    const manifest = readFileSync(join(root, 'package.json'), 'utf8');
    const nls = JSON.parse(readFileSync(join(root, 'package.nls.json'), 'utf8')) as Record<string, string>;
    const used = new Set([...manifest.matchAll(/"%([^%"]+)%"/g)].map((m) => m[1]));
    assert.deepEqual([...used].filter((k) => !(k in nls)), [], 'keys without text');
    assert.deepEqual(Object.keys(nls).filter((k) => !used.has(k)), [], 'texts no contribution uses');
    const pkg = JSON.parse(manifest);
    for (const c of pkg.contributes.commands) assert.match(c.title, /^%command\.[A-Za-z]+\.title%$/, c.command);
    for (const [name, setting] of Object.entries(pkg.contributes.configuration.properties) as [string, { description?: string; markdownDescription?: string; scope?: string }][]) {
      assert.match(setting.description ?? setting.markdownDescription ?? '', /^%config\./, name);
      assert.ok(setting.scope, `${name} has no scope`);
    }
  });
});
