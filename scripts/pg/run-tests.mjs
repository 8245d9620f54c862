// `npm run test:pg`: the live PostgreSQL tests. They need two setups: one server (COUNTERCHECK_PG_ENV) and a
// coordinator with two shards joined by postgres_fdw (COUNTERCHECK_PG_DIST_ENV). Each one named by its variable is
// used as it is; each one not named is started here (PostgreSQL is installed from Debian's packages when missing)
// and stopped afterwards, whatever the outcome.
import { spawnSync } from 'node:child_process';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = join(dirname(fileURLToPath(import.meta.url)), '..', '..');
const run = (cmd, args, env = process.env) => spawnSync(cmd, args, { cwd: root, stdio: 'inherit', env }).status ?? 1;
const mocha = (env) => run(process.execPath, [join(root, 'node_modules', 'mocha', 'bin', 'mocha.js'), '--config', 'test/pg/.mocharc.json'], env);
const script = (name) => join(root, 'scripts', 'pg', name);

const setups = [
  { variable: 'COUNTERCHECK_PG_ENV', name: 'pg', start: [], stop: 'stop.sh', what: 'a PostgreSQL server' },
  { variable: 'COUNTERCHECK_PG_DIST_ENV', name: 'pg-dist', start: ['--distributed'], stop: 'stop-distributed.sh', what: 'the distributed PostgreSQL (coordinator and two shards)' },
]
  .filter((s) => !process.env[s.variable])
  // A folder of its own for each run, so two runs on one machine never stop each other's servers.
  .map((s) => ({ ...s, dir: mkdtempSync(join(tmpdir(), `countercheck-local-${s.name}-`)) }));

const started = [];
const stopAll = () => {
  for (const s of started.splice(0)) run('bash', [script(s.stop), s.dir]);
};
process.on('SIGINT', () => { stopAll(); process.exit(130); });
process.on('SIGTERM', () => { stopAll(); process.exit(143); });

const env = { ...process.env };
for (const s of setups) {
  started.push(s);
  if (run('bash', [script('ensure-server.sh'), ...s.start, s.dir]) !== 0) {
    stopAll();
    console.error(`could not start ${s.what} for the tests`);
    console.log('  0 passing\n  1 failing');
    process.exit(1);
  }
  env[s.variable] = join(s.dir, 'env');
}
const status = mocha(env);
stopAll();
process.exit(status);
