// Entry point the VS Code host calls with `extensionTestsPath`: runs every bundled *.test.js beside it.
import { readdirSync } from 'node:fs';
import { join } from 'node:path';
import Mocha = require('mocha');

export function run(): Promise<void> {
  const mocha = new Mocha({ ui: 'bdd', timeout: 30_000, color: false, reporter: 'spec', grep: process.env.COUNTERCHECK_GREP });
  for (const file of readdirSync(__dirname).filter((f) => f.endsWith('.test.js')).sort()) {
    mocha.addFile(join(__dirname, file));
  }
  return new Promise((resolve, reject) => {
    mocha.run((failures) => (failures > 0 ? reject(new Error(`${failures} integration test(s) failed`)) : resolve()));
  });
}
