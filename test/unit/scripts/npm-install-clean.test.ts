// The first-run bug: `npm run demo` / `npm test` run the host setup under an outer `npm run`, which exports
// npm_config_user_agent naming the outer Node; the inner `npm install` takes that variable as its own config and
// hands it to the package's install script, which then refuses "the wrong Node" (code-server's postinstall does
// this). scripts/lib/npm-install-clean.sh must install as a fresh shell would. The package below reproduces the
// check: its install script fails unless npm's user agent names the Node that actually runs it.
import { strict as assert } from 'node:assert';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, mkdirSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';

const root = resolve(__dirname, '..', '..', '..');
const script = join(root, 'scripts', 'lib', 'npm-install-clean.sh');
// What an outer `npm run` under an older Node exports.
const outerNpmRun = {
  ...process.env,
  npm_config_user_agent: 'npm/10.8.2 node/v18.20.0 linux x64 workspaces/false',
  npm_node_execpath: '/usr/bin/node18',
  npm_lifecycle_event: 'demo',
};

describe('child npm installs under an outer npm run (first-run bug)', function () {
  this.timeout(120_000);
  let temp: string;
  let tarball: string;

  before(() => {
    temp = mkdtempSync(join(tmpdir(), 'countercheck-npm-env-'));
    const pkg = join(temp, 'pkg');
    mkdirSync(pkg);
    writeFileSync(join(pkg, 'package.json'), JSON.stringify({
      name: 'node-version-guard', version: '1.0.0',
      scripts: { postinstall: 'node check.js' },
    }));
    writeFileSync(join(pkg, 'check.js'),
      "const ua = process.env.npm_config_user_agent || '';\n" +
      "if (!ua.includes('node/' + process.version)) { console.error('wrong node: ' + ua + ' vs ' + process.version); process.exit(1); }\n");
    const packed = spawnSync('npm', ['pack', '--silent', '--pack-destination', temp], { cwd: pkg, encoding: 'utf8' });
    assert.equal(packed.status, 0, packed.stderr);
    tarball = join(temp, readdirSync(temp).find((f) => f.endsWith('.tgz'))!);
  });
  after(() => rmSync(temp, { recursive: true, force: true }));

  it('a plain inner npm install inherits the outer user agent and the install script refuses (the bug)', () => {
    const r = spawnSync('npm', ['install', '--prefix', join(temp, 'plain'), '--no-audit', '--no-fund', tarball], { env: outerNpmRun, encoding: 'utf8' });
    assert.notEqual(r.status, 0, 'expected the reproduction to fail without the clean environment');
    assert.match(r.stderr + r.stdout, /wrong node: npm\/10\.8\.2 node\/v18\.20\.0/);
  });

  it('scripts/lib/npm-install-clean.sh installs with the Node it is given, whatever the outer npm run exported', () => {
    const r = spawnSync('bash', [script, dirname(process.execPath), join(temp, 'clean'), tarball], { env: outerNpmRun, encoding: 'utf8' });
    assert.equal(r.status, 0, `install failed:\n${r.stdout}\n${r.stderr}`);
  });
});
