// `npm run test:pg`: the live PostgreSQL tests. When COUNTERCHECK_PG_ENV names a running server (as
// .ci/run arranges), the tests use it; otherwise a throwaway cluster is started here (PostgreSQL is
// installed from Debian's packages when missing) and stopped afterwards, whatever the outcome.
import { spawnSync } from 'node:child_process';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = join(dirname(fileURLToPath(import.meta.url)), '..', '..');
const run = (cmd, args, env = process.env) => spawnSync(cmd, args, { cwd: root, stdio: 'inherit', env }).status ?? 1;
const mocha = (env) => run(process.execPath, [join(root, 'node_modules', 'mocha', 'bin', 'mocha.js'), '--config', 'test/pg/.mocharc.json'], env);

if (process.env.COUNTERCHECK_PG_ENV) {
  process.exit(mocha(process.env));
}

const dir = '/tmp/countercheck-local-pg';
const stop = () => run('bash', [join(root, 'scripts', 'pg', 'stop.sh'), dir]);
process.on('SIGINT', () => { stop(); process.exit(130); });
process.on('SIGTERM', () => { stop(); process.exit(143); });
const setup = run('bash', [join(root, 'scripts', 'pg', 'ensure-server.sh'), dir]);
if (setup !== 0) {
  console.error('could not start a PostgreSQL server for the tests');
  console.log('  0 passing\n  1 failing');
  process.exit(1);
}
const status = mocha({ ...process.env, COUNTERCHECK_PG_ENV: join(dir, 'env') });
stop();
process.exit(status);
