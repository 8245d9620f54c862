// "Test a Database Table or Query…" in the real extension host, against a live PostgreSQL server.
// scripts/real-host/run-integration.mjs hands the server to code-server as PG* variables (the server
// of COUNTERCHECK_PG_ENV under .ci/run, else a throwaway cluster it starts); the password reaches the
// extension through PGPASSWORD, the connection through the workspace setting countercheck.connections.
// No server means these tests FAIL with the reason: they never skip.
import { strict as assert } from 'node:assert';
import { randomBytes } from 'node:crypto';
import { Client } from 'pg';
import * as vscode from 'vscode';
import { main as cli } from '../../src/cli';
import { previewSql } from '../../src/data/sql/index';
import type { TestResult } from '../../src/stats/result';
import { api, closeAllEditors, closeTo, panelFrom, workspacePath, TOTAL_FIXED } from './api';

const CONNECTION = 'itest';
const table = `public.van_log_${randomBytes(4).toString('hex')}`;

// A bakery's delivery vans: route × delivery outcome. Unicode label included.
const routes = ['Harbour', 'Hillside', 'Old Town', 'Ölberg'];
const outcomes = ['on time', 'late', 'damaged'];
const counts = [
  [34, 9, 3],
  [21, 15, 6],
  [28, 7, 2],
  [17, 12, 9],
];
// Rows the default missing-value policy drops: SQL NULL, and the text "NA".
const droppedRows: [string | null, string | null][] = [
  ['Hillside', null],
  ['Hillside', null],
  [null, 'late'],
  ['Harbour', 'NA'],
];

interface Row {
  route: string | null;
  outcome: string | null;
  minutes: number | null;
}

function rows(): Row[] {
  const out: Row[] = [];
  let i = 0;
  // Interleaved, so the server's order of rows is not the order of the table.
  const cells = counts.flatMap((row, r) => row.map((n, c) => ({ r, c, left: n })));
  while (cells.some((x) => x.left > 0)) {
    for (const cell of cells) {
      if (cell.left === 0) continue;
      cell.left--;
      i++;
      // Delivery minutes in quarter-minute steps (exact in binary), one missing.
      out.push({ route: routes[cell.r], outcome: outcomes[cell.c], minutes: i === 50 ? null : 18 + ((i * 37) % 29) * 0.25 + cell.r * 1.5 });
    }
  }
  for (const [route, outcome] of droppedRows) out.push({ route, outcome, minutes: 21 });
  return out;
}
const data = rows();

function pgEnv(): { host: string; port: number; database: string; user: string; password: string } {
  const e = process.env;
  if (e.COUNTERCHECK_PG_ERROR) throw new Error(`no PostgreSQL server for the SQL tests: ${e.COUNTERCHECK_PG_ERROR}`);
  if (!e.PGHOST || !e.PGPORT || !e.PGDATABASE || !e.PGUSER || !e.PGPASSWORD) {
    throw new Error('no PostgreSQL server for the SQL tests: PGHOST, PGPORT, PGDATABASE, PGUSER and PGPASSWORD must reach the extension host (scripts/real-host/run-integration.mjs sets them)');
  }
  return { host: e.PGHOST, port: Number(e.PGPORT), database: e.PGDATABASE, user: e.PGUSER, password: e.PGPASSWORD };
}

async function sql<T = Record<string, unknown>>(text: string, values: unknown[] = []): Promise<T[]> {
  const client = new Client({ ...pgEnv(), application_name: 'integration-harness' });
  await client.connect();
  try {
    const result = await client.query(text, values);
    // Several statements in one simple query: the rows of the last.
    const last = Array.isArray(result) ? result[result.length - 1] : result;
    return last.rows as T[];
  } finally {
    await client.end();
  }
}

/** The extension's sessions still open on the server (waits for closing backends to go). */
async function openSessions(): Promise<unknown[]> {
  const until = Date.now() + 3000;
  for (;;) {
    const left = await sql("SELECT pid, state FROM pg_stat_activity WHERE application_name LIKE 'countercheck%'");
    if (left.length === 0 || Date.now() > until) return left;
    await new Promise((r) => setTimeout(r, 100));
  }
}

async function runInlineSpec(name: string, spec: object): Promise<TestResult> {
  const uri = vscode.Uri.file(workspacePath('integration-data', name));
  await vscode.workspace.fs.writeFile(uri, new TextEncoder().encode(JSON.stringify({ version: 1, ...spec }, null, 2)));
  const payload = await panelFrom(() => vscode.commands.executeCommand('countercheck.runSavedSpec', uri));
  return payload.result as TestResult;
}

function database(answers: object): Thenable<unknown> {
  return vscode.commands.executeCommand('countercheck.runOnDatabase', { connection: CONNECTION, table, where: '', ...answers });
}

describe('database command on a live PostgreSQL server', function () {
  this.timeout(60_000);

  before(async () => {
    const env = pgEnv();
    try {
      await sql('SELECT 1');
    } catch (e) {
      throw new Error(`the PostgreSQL server at ${env.host}:${env.port} does not answer: ${(e as Error).message}`);
    }
    await sql(`CREATE TABLE ${table} (route text, outcome text, minutes double precision)`);
    await sql(`INSERT INTO ${table} SELECT * FROM unnest($1::text[], $2::text[], $3::double precision[])`, [data.map((r) => r.route), data.map((r) => r.outcome), data.map((r) => r.minutes)]);
    // The connection as a user configures it; the password comes from PGPASSWORD, never from settings.
    await vscode.workspace
      .getConfiguration('countercheck')
      .update('connections', { [CONNECTION]: { host: env.host, port: env.port, database: env.database, user: env.user, sslmode: 'disable' } }, vscode.ConfigurationTarget.Workspace);
  });

  after(async () => {
    await closeAllEditors();
    if (process.env.COUNTERCHECK_PG_ERROR || !process.env.PGHOST) return;
    await vscode.workspace.getConfiguration('countercheck').update('connections', undefined, vscode.ConfigurationTarget.Workspace);
    await sql(`DROP TABLE IF EXISTS ${table}`);
  });

  it('cross-tabulates two columns on the server: the panel equals the same counts given inline', async () => {
    const payload = await panelFrom(() => database({ test: 'independence', ...TOTAL_FIXED, columns: ['route', 'outcome'] }));
    const r = payload.result as TestResult;
    assert.equal(r.test, 'independence');
    assert.match(payload.sourceDescription, new RegExp(`sql:${CONNECTION} .*van_log_`));
    const grid = r.grid;
    assert.ok(grid, 'a grid of counts');
    assert.deepEqual([...grid.rowLabels].sort(), [...routes].sort());
    assert.deepEqual([...grid.columnLabels].sort(), [...outcomes].sort());
    // The counts the test itself loaded, in the panel's order: NULL and "NA" rows dropped, everything else exact.
    const expected = grid.rowLabels.map((route) => grid.columnLabels.map((outcome) => counts[routes.indexOf(route)][outcomes.indexOf(outcome)]));
    assert.deepEqual(grid.observed, expected);
    assert.equal(r.n, 163);

    const inline = await runInlineSpec('van-log-inline.countercheck.json', { test: 'independence', table: expected, rowLabels: grid.rowLabels, columnLabels: grid.columnLabels });
    assert.deepEqual(inline.grid?.observed, grid.observed);
    assert.equal(inline.df, r.df);
    assert.equal(inline.statistic, r.statistic);
    assert.equal(inline.pValue.value, r.pValue.value);
    // scipy 1.10.1 stats.chi2_contingency([[34,9,3],[21,15,6],[28,7,2],[17,12,9]], correction=False): 15.21339038096156, p 0.018660392207227896, dof 6.
    closeTo(r.statistic, 15.21339038096156, 1e-9, 'X²');
    closeTo(r.pValue.value, 0.018660392207227896, 1e-12, 'p');
    assert.equal(r.df, 6);
    assert.deepEqual(await openSessions(), [], 'no session of the extension left open');
  });

  it('the saved result re-runs from the command line, with the connection the editor keeps in .vscode/settings.json', async () => {
    const payload = await panelFrom(() => database({ test: 'independence', ...TOTAL_FIXED, columns: ['route', 'outcome'] }));
    const target = vscode.Uri.file(workspacePath('integration-data', 'van-log.countercheck.json'));
    await (await api()).saveActive(target);
    const settings = new TextDecoder().decode(await vscode.workspace.fs.readFile(vscode.Uri.file(workspacePath('.vscode', 'settings.json'))));
    assert.match(settings, /"countercheck\.connections"/);
    assert.ok(!settings.includes(pgEnv().password), 'no password in the settings file');
    const run = async (args: string[]): Promise<{ code: number; stdout: string; stderr: string }> => {
      let stdout = '';
      let stderr = '';
      const code = await cli(args, { stdout: (t) => (stdout += t), stderr: (t) => (stderr += t), readStdin: async () => '', cwd: workspacePath() });
      return { code, stdout, stderr };
    };
    const ran = await run(['run', '--json', target.fsPath]);
    assert.equal(ran.code, 0, ran.stderr);
    const json = JSON.parse(ran.stdout) as { statistic: number; observed: number[][]; rowLabels: string[] };
    const r = payload.result as TestResult;
    assert.deepEqual(json.observed, r.grid?.observed);
    assert.deepEqual(json.rowLabels, r.grid?.rowLabels);
    assert.equal(json.statistic, r.statistic);
    const checked = await run(['check', '--json', target.fsPath]);
    assert.equal(checked.code, 0, `${checked.stdout}${checked.stderr}`);
    assert.equal((JSON.parse(checked.stdout) as { status: string }[])[0].status, 'reproduced');
  });

  it('tests the variance of a numeric column: the server’s moments equal the same values given inline', async () => {
    const payload = await panelFrom(() => database({ test: 'variance', columns: ['minutes'], sigma0: 1.5, alternative: 'two-sided' }));
    const r = payload.result as TestResult;
    const values = data.map((d) => d.minutes).filter((m): m is number => m !== null);
    assert.equal(r.test, 'variance');
    assert.equal(r.n, values.length);
    const inline = await runInlineSpec('van-minutes-inline.countercheck.json', { test: 'variance', values, sigma0: 1.5, alternative: 'two-sided' });
    assert.equal(inline.n, r.n);
    assert.equal(inline.df, r.df);
    closeTo(r.statistic, inline.statistic, 1e-12 * inline.statistic, 'X² through PostgreSQL vs inline values');
    assert.ok(inline.estimates.length > 0, 'the variance test reports estimates');
    for (const e of inline.estimates) {
      const got = r.estimates.find((x) => x.id === e.id);
      assert.ok(got, `estimate ${e.id} in the database result`);
      closeTo(got.value, e.value, 1e-12 * Math.abs(e.value), `estimate ${e.id}`);
    }
  });

  it('fits a distribution to a numeric column: the server sends the values, and the result equals the same values given inline', async () => {
    const payload = await panelFrom(() => database({ test: 'distribution-fit', columns: ['minutes'], family: 'normal' }));
    const r = payload.result as TestResult;
    const values = data.map((d) => d.minutes).filter((m): m is number => m !== null);
    assert.equal(r.test, 'distribution-fit');
    const inline = await runInlineSpec('van-minutes-fit-inline.countercheck.json', { test: 'distribution-fit', values, family: 'normal' });
    assert.equal(r.n, inline.n);
    assert.equal(r.df, inline.df);
    closeTo(r.statistic, inline.statistic, 1e-9 * inline.statistic, 'X² of the normal fit through PostgreSQL vs inline values');
  });

  it('goodness of fit, post-hoc comparisons and a trend test from the server\'s counts, through the one wizard', async () => {
    // Column sums of the counts above, plus the row whose route is NULL (its outcome "late" still counts alone).
    const fit = (await panelFrom(() => database({ test: 'goodness-of-fit', columns: ['outcome'], proportions: 'equal' }))).result as TestResult;
    assert.equal(fit.test, 'goodness-of-fit');
    assert.deepEqual(Object.fromEntries((fit.categories ?? []).map((c) => [c.label, c.observed])), { damaged: 20, late: 44, 'on time': 100 });
    const total = counts.flat().reduce((a, b) => a + b, 0);
    const posthoc = (await panelFrom(() => database({ test: 'post-hoc', columns: ['route', 'outcome'], compare: 'cells', adjustment: 'holm' }))).result as TestResult;
    assert.equal(posthoc.test, 'post-hoc');
    assert.equal(posthoc.n, total);
    const trend = (await panelFrom(() => database({ test: 'trend', columns: ['outcome', 'route'], rowLabels: ['on time', 'late', 'damaged'], columnLabels: routes }))).result as TestResult;
    assert.equal(trend.test, 'trend');
    assert.equal(trend.n, total);
  });

  it('a column that is not in the table: a notification naming it and the real columns, no panel, nothing thrown', async () => {
    const a = await api();
    const panels = a.panels().length;
    // Names are exact: "Route" is not "route".
    await database({ test: 'independence', ...TOTAL_FIXED, columns: ['Route', 'outcome'] });
    const err = a.lastError();
    assert.ok(err, 'an error notification was shown');
    assert.equal(err.code, 'sql-unknown-column', err.message);
    assert.match(err.message, /`Route`/);
    assert.match(err.message, /did you mean `route`/);
    assert.match(err.message, /route, outcome, minutes/);
    assert.equal(a.panels().length, panels, 'no panel for a refused run');
    assert.deepEqual(await openSessions(), [], 'no session of the extension left open');
  });

  it('the statements an untrusted workspace shows before asking are the ones that give the counts', async () => {
    // The trust prompt is a modal dialog (and this host runs with trust disabled); what it shows is previewSql's text.
    const preview = previewSql({ sql: { connection: CONNECTION, table } }, { kind: 'crosstab', rowColumn: 'route', columnColumn: 'outcome' });
    assert.match(preview, new RegExp(`connection "${CONNECTION}", read-only transaction`));
    assert.match(preview, /"route"/);
    assert.match(preview, /"outcome"/);
    assert.ok(preview.includes(`"public"."${table.split('.')[1]}"`), preview);
    // Run as shown (as a user would paste it into psql), the last statement gives the table's counts.
    const shown = await sql<{ k0: string | null; k1: string | null; records: string }>(preview);
    const byCell = new Map(shown.map((row) => [`${row.k0}|${row.k1}`, Number(row.records)]));
    routes.forEach((route, i) => outcomes.forEach((outcome, j) => assert.equal(byCell.get(`${route}|${outcome}`), counts[i][j], `${route} × ${outcome}`)));
  });
});
