// `npm run test:electron`: the same integration suite in a desktop VS Code that @vscode/test-electron
// downloads. Only for machines that reach the VS Code download site; offline machines use
// `npm run test:integration` (a browser-based VS Code from the npm registry).
import { runTests } from '@vscode/test-electron';
import { cpSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { buildIntegrationTests } from './real-host/build-tests.mjs';
import { repoRoot } from './real-host/host.mjs';

const workspace = mkdtempSync(join(tmpdir(), 'countercheck-electron-'));
cpSync(join(repoRoot, 'demo'), workspace, { recursive: true });
cpSync(join(repoRoot, 'test', 'integration', 'data'), join(workspace, 'integration-data'), { recursive: true });
try {
  const extensionTestsPath = await buildIntegrationTests();
  await runTests({
    extensionDevelopmentPath: repoRoot,
    extensionTestsPath,
    launchArgs: [workspace, '--disable-extensions', '--disable-workspace-trust'],
  });
} catch (e) {
  console.error(e?.message ?? e);
  process.exitCode = 1;
} finally {
  rmSync(workspace, { recursive: true, force: true });
}
