// Living report blocks: parsing, inserting and replacing results between markers, byte-for-byte
// preservation of everything else, and idempotence.
import { strict as assert } from 'node:assert';
import { RESULT_END, RESULT_START, parseReportBlocks, refreshReport, rewriteReport } from '../../../src/report/blocks';

const report = [
  '# Line audit',
  '',
  'Some text with trailing spaces.   ',
  '',
  '```countercheck',
  '{"test": "distribution", "df": 1, "x": 3.84}',
  '```',
  '',
  '```json',
  '{"not": "ours"}',
  '```',
  '',
  '~~~~ countercheck',
  '{"spec": "a.countercheck.json"}',
  '~~~~',
  'Closing words.',
  '',
].join('\n');

const render = async (body: string): Promise<string> => `Result for ${body.length} characters of spec.\n\n| a | b |\n| --- | ---: |\n| x | 1 |\n`;

describe('living report blocks', () => {
  it('finds only countercheck fences, with their lines and bodies', () => {
    const blocks = parseReportBlocks(report);
    assert.equal(blocks.length, 2);
    assert.equal(blocks[0].fenceLine, 5);
    assert.equal(blocks[0].body, '{"test": "distribution", "df": 1, "x": 3.84}');
    assert.equal(blocks[1].fenceLine, 13);
    assert.equal(blocks[1].body, '{"spec": "a.countercheck.json"}');
  });

  it('inserts results below each block between markers, keeping all other bytes', async () => {
    const once = await refreshReport(report, (b) => render(b.body));
    assert.deepEqual(once.blocks.map((b) => b.changed), [true, true]);
    // Removing the two inserted regions (and the line breaks added with them) gives the original back.
    const stripped = once.text.replace(new RegExp(`\\n${escape(RESULT_START)}[\\s\\S]*?${escape(RESULT_END)}\\n`, 'g'), '');
    assert.equal(stripped, report);
    assert.equal(once.text.split(RESULT_START).length, 3);
  });

  it('refreshing twice gives identical bytes, and reports nothing changed', async () => {
    const once = await refreshReport(report, (b) => render(b.body));
    const twice = await refreshReport(once.text, (b) => render(b.body));
    assert.equal(twice.text, once.text);
    assert.deepEqual(twice.blocks.map((b) => b.changed), [false, false]);
  });

  it('replaces only the region between the markers when a result changes', async () => {
    const once = await refreshReport(report, (b) => render(b.body));
    const edited = once.text.replace('Closing words.', 'Closing words, edited by hand.');
    const changed = await refreshReport(edited, async (b) => (b.index === 0 ? 'A new result.\n' : render(b.body)));
    assert.deepEqual(changed.blocks.map((b) => b.changed), [true, false]);
    assert.ok(changed.text.includes('Closing words, edited by hand.'));
    assert.ok(changed.text.includes(`${RESULT_START}\n\nA new result.\n\n${RESULT_END}`));
    const before = edited.slice(edited.indexOf('```json'));
    const after = changed.text.slice(changed.text.indexOf('```json'));
    assert.equal(after, before);
  });

  it('keeps CRLF line endings and a file without a final newline', async () => {
    const crlf = '# R\r\n\r\n```countercheck\r\n{"test": "distribution", "df": 2, "x": 1}\r\n```';
    const once = await refreshReport(crlf, async () => 'line one\nline two\n');
    assert.ok(once.text.startsWith(crlf + '\r\n\r\n' + RESULT_START + '\r\n'));
    assert.ok(!/[^\r]\n/.test(once.text), 'only CRLF line breaks');
    assert.equal((await refreshReport(once.text, async () => 'line one\nline two\n')).text, once.text);
  });

  it('writes the error between the markers when a block cannot run', async () => {
    const out = await refreshReport(report, async (b) => {
      if (b.index === 1) throw new Error('a.countercheck.json: cannot read the spec: no such file');
      return render(b.body);
    });
    assert.match(out.blocks[1].error!, /no such file/);
    assert.match(out.text, /> \*\*Countercheck could not run this block\.\*\*\n>\n> a\.countercheck\.json: cannot read the spec: no such file/);
  });

  it('never rewrites a block whose end marker is missing', async () => {
    const broken = '```countercheck\n{}\n```\n\n' + RESULT_START + '\nold result\n\nMore text.\n';
    const out = await refreshReport(broken, async () => 'new');
    assert.equal(out.text, broken);
    assert.match(out.blocks[0].error!, /without its end marker/);
  });

  it('leaves a block without a closing fence alone', () => {
    const blocks = parseReportBlocks('```countercheck\n{"test": "distribution"}\n');
    assert.match(blocks[0].problem!, /no closing fence/);
    assert.equal(rewriteReport('```countercheck\n{}\n', blocks.map((block) => ({ block, markdown: 'x' }))).changed.length, 0);
  });
});

function escape(s: string): string {
  return s.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');
}
