// The panel's messages are checked before the host acts on them: plot and table indexes are whole numbers,
// a PNG answer carries a data URL or an error, unknown actions are refused.
import { strict as assert } from 'node:assert';
import { isWebviewToHost } from '../../../src/protocol';

describe('panel messages', () => {
  it('accepts the messages the webview sends and refuses malformed ones', () => {
    for (const ok of [{ type: 'ready' }, { type: 'action', action: 'open-new' }, { type: 'save-plot', index: 0 }, { type: 'copy-table', index: 2 }, { type: 'png', requestId: 1, dataUrl: 'data:image/png;base64,AA==' }, { type: 'png', requestId: 2, error: 'no canvas' }]) {
      assert.equal(isWebviewToHost(ok), true, JSON.stringify(ok));
    }
    for (const bad of [null, 'ready', { type: 'action', action: 'delete-everything' }, { type: 'save-plot', index: -1 }, { type: 'save-plot', index: 1.5 }, { type: 'copy-table' }, { type: 'png', requestId: 1 }, { type: 'png', requestId: 'x', dataUrl: 'data:' }]) {
      assert.equal(isWebviewToHost(bad), false, JSON.stringify(bad));
    }
  });
});
