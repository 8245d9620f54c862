// Errors written into a report's blocks name files relative to the report, never by an absolute local path
// (a report is shared; the path would show where it was refreshed).
import { strict as assert } from 'node:assert';
import { parseReportBlocks, refreshReport } from '../../../src/report/blocks';
import { runReportBlock } from '../../../src/savedtest/living';

const folder = '/home/someone/private/project';
const report = `${folder}/docs/report.md`;
const readers = { aggregateFile: async (): Promise<never> => { throw new Error(`ENOENT: no such file or directory, open '${folder}/docs/data/x.csv'`); } };

async function refreshed(body: string, readText: (f: string) => Promise<string>): Promise<string> {
  const text = `# Report\n\n\`\`\`countercheck\n${body}\n\`\`\`\n`;
  assert.equal(parseReportBlocks(text).length, 1);
  const out = await refreshReport(text, async (block) => (await runReportBlock(block, { reportPath: report, readers, readText, allowedRoot: folder })).markdown);
  return out.text;
}

describe('report blocks carry paths relative to the report', () => {
  it('an invalid inline spec', async () => {
    const text = await refreshed('{"test": "independence", "tabel": [[1, 2], [3, 4]]}', async () => '');
    assert.match(text, /could not run this block/);
    assert.ok(!text.includes(folder), text);
    assert.match(text, /report\.md:4:/);
  });

  it('a spec file that cannot be read (the reader\'s message names an absolute path)', async () => {
    const text = await refreshed('{"spec": "tests/gone.countercheck.json"}', async (f) => {
      throw new Error(`ENOENT: no such file or directory, open '${f}'`);
    });
    assert.ok(!text.includes(folder), text);
    assert.match(text, /tests\/gone\.countercheck\.json/);
  });

  it('a data file that cannot be read', async () => {
    const text = await refreshed('{"test": "goodness-of-fit", "source": {"path": "data/x.csv", "columns": ["c"]}}', async () => '');
    assert.ok(!text.includes(folder), text);
    assert.match(text, /data\/x\.csv/);
  });
});
