// The command line finds a SQL source's named connection in the workspace's .vscode/settings.json
// (walking up from the spec's folder), as the editor does. No server is needed: the connection points at
// a closed port, and the message says which host, port, database and user were taken from the settings.
import { strict as assert } from 'node:assert';
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { createServer } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { main } from '../../../src/cli';

let dir: string;

async function cli(args: string[], cwd = dir): Promise<{ code: number; stderr: string }> {
  let stderr = '';
  const code = await main(args, { stdout: () => {}, stderr: (t) => (stderr += t), readStdin: async () => '', cwd });
  return { code, stderr };
}

/** A port nothing listens on (bound, then closed). */
function closedPort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = createServer().listen(0, '127.0.0.1', () => {
      const { port } = server.address() as { port: number };
      server.close(() => resolve(port));
    });
    server.on('error', reject);
  });
}

const spec = JSON.stringify({ version: 1, test: 'independence', source: { sql: { connection: 'greenhouse', table: 'public.harvest_crates' }, columns: ['bay', 'grade'] } });

describe('command line: SQL connections from the workspace settings', function () {
  this.timeout(20_000);

  beforeEach(() => {
    dir = mkdtempSync(join(tmpdir(), 'countercheck-cli-connections-'));
    mkdirSync(join(dir, 'specs', 'weekly'), { recursive: true });
    writeFileSync(join(dir, 'specs', 'weekly', 'crates.countercheck.json'), spec);
  });
  afterEach(() => rmSync(dir, { recursive: true, force: true }));

  it('uses host, port, database and user of the nearest .vscode/settings.json above the spec', async () => {
    const port = await closedPort();
    mkdirSync(join(dir, '.vscode'));
    writeFileSync(
      join(dir, '.vscode', 'settings.json'),
      `{\n  // written by the editor's settings page\n  "countercheck.connections": {\n    "greenhouse": { "host": "127.0.0.1", "port": ${port}, "database": "harvest", "user": "grower", "sslmode": "disable", },\n  },\n}\n`,
    );
    // Run from the spec's own folder: the settings are two folders up.
    const out = await cli(['run', 'crates.countercheck.json'], join(dir, 'specs', 'weekly'));
    assert.equal(out.code, 2, out.stderr);
    assert.ok(out.stderr.includes(`"greenhouse" (grower@127.0.0.1:${port}/harvest, TLS disable): cannot reach the server (ECONNREFUSED)`), out.stderr);
  });

  it('without a settings file the name is looked up in the environment, and the message says where to add it', async () => {
    const out = await cli(['run', 'specs/weekly/crates.countercheck.json']);
    assert.equal(out.code, 2);
    assert.match(out.stderr, /no connection named "greenhouse": add it to the setting countercheck\.connections or set COUNTERCHECK_CONNECTION_GREENHOUSE/);
  });

  it('refuses a password in the settings file, and a settings file that is not JSON, naming the file', async () => {
    mkdirSync(join(dir, 'specs', '.vscode'));
    const settings = join(dir, 'specs', '.vscode', 'settings.json');
    writeFileSync(settings, '{ "countercheck.connections": { "greenhouse": { "host": "127.0.0.1", "password": "hunter2" } } }');
    const withPassword = await cli(['run', 'specs/weekly/crates.countercheck.json']);
    assert.equal(withPassword.code, 2);
    assert.match(withPassword.stderr, /a password does not belong in settings/);
    assert.ok(!withPassword.stderr.includes('hunter2'), 'the password is not repeated');
    writeFileSync(settings, '{ "countercheck.connections": { ');
    const broken = await cli(['run', 'specs/weekly/crates.countercheck.json']);
    assert.equal(broken.code, 2);
    assert.ok(broken.stderr.includes(`${settings}:1:33: not valid JSON (with comments)`), broken.stderr);
  });
});
