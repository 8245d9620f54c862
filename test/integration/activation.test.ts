import { strict as assert } from 'node:assert';
import * as vscode from 'vscode';

describe('activation', () => {
  it('activates the extension from the development path', async () => {
    const ext = vscode.extensions.getExtension('countercheck.countercheck');
    assert.ok(ext, 'extension countercheck.countercheck is not loaded');
    await ext.activate();
    assert.equal(ext.isActive, true);
  });
});
