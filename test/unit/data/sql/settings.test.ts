// Named connections read from a workspace's .vscode/settings.json for the command line.
import { strict as assert } from 'node:assert';
import * as path from 'node:path';
import { connectionsFromSettings, parseSettingsText, workspaceConnections } from '../../../../src/data/sql/settings';
import { isInputError } from '../../../../src/errors';

const settingsText = `{
  // the greenhouse server (comments and trailing commas, as VS Code writes and allows them)
  "editor.tabSize": 2,
  /* a block comment with "quotes" and a } inside */
  "countercheck.connections": {
    "greenhouse": { "host": "db.example", "port": 5433, "database": "harvest", "user": "grower", "sslmode": "verify-full", },
  },
  "files.exclude": { "**/*.tmp": true, "a,}": "b // not a comment", },
}
`;

describe('connections from .vscode/settings.json', () => {
  it('reads countercheck.connections from JSON with comments and trailing commas, strings untouched', () => {
    assert.deepEqual(connectionsFromSettings(settingsText, 'settings.json'), {
      greenhouse: { host: 'db.example', port: 5433, database: 'harvest', user: 'grower', sslmode: 'verify-full' },
    });
    const plain = parseSettingsText(settingsText, 's.json') as Record<string, Record<string, unknown>>;
    assert.deepEqual(plain['files.exclude'], { '**/*.tmp': true, 'a,}': 'b // not a comment' });
    assert.equal((parseSettingsText('\ufeff["a\\"//", 1,]', 's.json') as string[]).join('|'), 'a"//|1');
  });

  it('a file without the setting, or an empty file, gives undefined', () => {
    assert.equal(connectionsFromSettings('{ "editor.tabSize": 4 }', 's.json'), undefined);
    assert.equal(connectionsFromSettings('', 's.json'), undefined);
  });

  it('refuses a broken file and a wrongly shaped setting with the file and what was expected', () => {
    const refusal = (text: string): string => {
      try {
        connectionsFromSettings(text, '/w/.vscode/settings.json');
      } catch (e) {
        assert.ok(isInputError(e), String(e));
        return e.message;
      }
      assert.fail(`accepted: ${text}`);
    };
    assert.match(refusal('{ "countercheck.connections": { "a": 1 '), /^\/w\/\.vscode\/settings\.json:1:40: not valid JSON \(with comments\): expected `,` or `\}`, found the end of the file/);
    // A line and column, not an offset into the file.
    assert.match(refusal('{\n  // proxy\n  "http.proxy": "x",\n  "countercheck.connections": {\n    "greenhouse": { "host": "db" }\n    "bakery": {}\n  }\n}'), /settings\.json:6:5: not valid JSON \(with comments\): expected `,` or `\}`, found `"bakery"`/);
    assert.match(refusal('{ "a": /* open'), /settings\.json:1:8: not valid JSON \(with comments\): unterminated comment/);
    assert.match(refusal('[1, 2]'), /expected an object of settings/);
    assert.match(refusal('{ "countercheck.connections": ["greenhouse"] }'), /must be an object of named connections/);
    assert.match(refusal('{ "countercheck.connections": { "greenhouse": "postgres://x" } }'), /"greenhouse" must be an object \(host, port/);
  });

  it('walks up from the spec folder to the nearest settings file that sets connections', async () => {
    const root = path.resolve('/work-tree');
    const files = new Map<string, string>([
      [path.join(root, '.vscode', 'settings.json'), '{ "countercheck.connections": { "top": {} } }'],
      [path.join(root, 'greenhouse', '.vscode', 'settings.json'), '{ "editor.tabSize": 2 }'],
      [path.join(root, 'bakery', '.vscode', 'settings.json'), '{ "countercheck.connections": { "ovens": { "port": 6000 } } }'],
    ]);
    const asked: string[] = [];
    const read = async (file: string): Promise<string | undefined> => {
      asked.push(file);
      return files.get(file);
    };
    const nested = await workspaceConnections(path.join(root, 'greenhouse', 'specs'), read);
    assert.equal(nested?.file, path.join(root, '.vscode', 'settings.json'));
    assert.deepEqual(nested?.connections, { top: {} });
    assert.deepEqual(asked.slice(0, 3), ['greenhouse/specs', 'greenhouse', ''].map((d) => path.join(root, d, '.vscode', 'settings.json')));
    assert.deepEqual((await workspaceConnections(path.join(root, 'bakery'), read))?.connections, { ovens: { port: 6000 } });
    assert.equal(await workspaceConnections(path.resolve('/elsewhere/deep'), read), undefined);
  });
});
