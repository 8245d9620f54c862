// Labels cannot inject markdown: every label goes through our writer and back through a CommonMark parser
// (markdown-it, with raw HTML allowed as in a preview that allows it), and must come out as the same text in the
// same table cell, or as one plain paragraph, never as a heading, list, quote, code block, link or emphasis.
import { strict as assert } from 'node:assert';
import fc from 'fast-check';
import MarkdownIt from 'markdown-it';
import { errorMarkdown } from '../../../src/report/blocks';
import { escapeMarkdown, markdownTable } from '../../../src/report/markdown';

const md = new MarkdownIt({ html: true });

type Token = ReturnType<InstanceType<typeof MarkdownIt>['parse']>[number];

/** Plain text of an inline token: text and entities as the reader sees them; any other child is a failure. */
function inlineText(inline: Token): string {
  return (inline.children ?? [])
    .map((c: Token) => {
      if (c.type === 'text') return c.content;
      if (c.type === 'softbreak' || c.type === 'hardbreak') return '\n';
      throw new Error(`markup in a label: ${c.type} in ${JSON.stringify(inline.content)}`);
    })
    .join('');
}

/** What a reader should see: line breaks as spaces; outer spaces and tabs dropped as a cell or paragraph does. */
const seen = (label: string): string => label.replace(/\r\n|\r|\n/g, ' ').replace(/^[ \t]+|[ \t]+$/g, '');

const HOSTILE = ['\r', '\n', '\r\n', '|', '`', '```', '~~~', '#', '>', '-', '+', '*', '_', '=', '1.', '2)', '[', ']', '(', ')', '!', '<', '>', '&', '&amp;', '&#35;', '\\', ' ', '    ', '\t', '<div>', '<!--', 'http://x.y', '<a href="x">', 'a', 'Z', 'é', '9', ':', '"', "'", '---', '***', '___'];
const label = fc.array(fc.oneof(fc.constantFrom(...HOSTILE), fc.string({ maxLength: 3 }).filter((s) => !s.includes('\0'))), { minLength: 1, maxLength: 12 }).map((parts) => parts.join(''));

describe('markdown escaping of labels', () => {
  it('a lone CR, CRLF and LF never start a new line: "a\\r\\r# Injected" stays one paragraph', () => {
    for (const text of ['a\r\r# Injected', 'a\r\n# Injected', 'a\n# Injected', 'a\r\r> quote', 'a\r- item']) {
      const tokens = md.parse(escapeMarkdown(text), {});
      assert.deepEqual(tokens.map((t) => t.type), ['paragraph_open', 'inline', 'paragraph_close'], JSON.stringify(text));
      assert.equal(inlineText(tokens[1]), seen(text));
    }
  });

  it('leading #, >, -, +, =, 1. and indentation do not make a heading, quote, list or code block', () => {
    for (const text of ['# h', '  # h', '> q', '- l', '+ l', '1. l', '3) l', '    code', '~~~', '---', '= x']) {
      const tokens = md.parse(escapeMarkdown(text), {});
      assert.deepEqual(tokens.map((t) => t.type), ['paragraph_open', 'inline', 'paragraph_close'], JSON.stringify(text));
      assert.equal(inlineText(tokens[1]), seen(text), JSON.stringify(text));
    }
  });

  it('property: any label comes back as the same text in the same table cell (seeded)', () => {
    fc.assert(
      fc.property(label, label, (a, b) => {
        fc.pre(seen(a) !== '' && seen(b) !== '');
        const table = markdownTable(['Category', 'Observed'], [[a, '1'], [b, '2']]);
        const tokens = md.parse(table, {});
        const cells: string[] = [];
        tokens.forEach((t, i) => {
          if (t.type === 'td_open' || t.type === 'th_open') cells.push(inlineText(tokens[i + 1]));
        });
        assert.deepEqual(cells, ['Category', 'Observed', seen(a), '1', seen(b), '2'], JSON.stringify({ a, b, table }));
      }),
      { seed: 20261203, numRuns: Number(process.env.FUZZ_RUNS ?? 2000) },
    );
  });

  it('property: any label as a paragraph is one paragraph of the same text (seeded)', () => {
    fc.assert(
      fc.property(label, (a) => {
        fc.pre(seen(a) !== '');
        const tokens = md.parse(escapeMarkdown(a), {});
        assert.deepEqual(tokens.map((t) => t.type), ['paragraph_open', 'inline', 'paragraph_close'], JSON.stringify(a));
        assert.equal(inlineText(tokens[1]), seen(a), JSON.stringify(a));
      }),
      { seed: 20261203, numRuns: Number(process.env.FUZZ_RUNS ?? 2000) },
    );
  });
});

describe('error blocks written into a report', () => {
  it('a message with line breaks and markup stays quoted text: no heading, list or code inside the quote', () => {
    const tokens = md.parse(errorMarkdown('data.csv, line 3: found `x`\n# Injected\r- item\r\n    code\n1. one'), {});
    const kinds = tokens.map((t) => t.type).filter((t) => !['blockquote_open', 'blockquote_close', 'paragraph_open', 'paragraph_close', 'inline'].includes(t));
    assert.deepEqual(kinds, [], JSON.stringify(tokens.map((t) => t.type)));
    const text = tokens.filter((t) => t.type === 'inline').slice(1).map(inlineText).join('\n');
    assert.match(text, /# Injected/);
    assert.match(text, /- item/);
  });
});
