// Results panels: one webview per result, so two results can sit side by side and each tab restores
// its own state after a reload. The host keeps what each panel needs to act (the spec behind it).
import * as vscode from 'vscode';
import { isWebviewToHost, type HostToWebview, type PanelAction, type PanelPayload, type PanelState } from '../protocol';
import { sourceKey } from './locations';
import { panelHtml } from './panelHtml';
import { errorMessage } from '../errors';

export const PANEL_VIEW_TYPE = 'countercheck.result';

/** What a panel can do besides showing: the handlers come from the command that made it. */
export interface PanelActions {
  onAction(action: PanelAction, panel: ResultPanel): Promise<void>;
  onSavePlot(index: number, panel: ResultPanel): Promise<void>;
  onCopyTable(index: number, panel: ResultPanel): Promise<void>;
}

export class ResultPanel {
  /** A copy opened with "Open in new panel": never replaced by a later run of the same source. */
  pinned = false;
  private disposed = false;
  private readonly disposables: vscode.Disposable[] = [];

  constructor(
    readonly panel: vscode.WebviewPanel,
    private payloadValue: PanelPayload,
    private readonly actions: PanelActions,
    private readonly onDispose: (p: ResultPanel) => void,
  ) {
    this.disposables.push(
      panel.onDidDispose(() => this.dispose()),
      panel.webview.onDidReceiveMessage((m: unknown) => this.receive(m)),
    );
  }

  get payload(): PanelPayload {
    return this.payloadValue;
  }

  get isDisposed(): boolean {
    return this.disposed;
  }

  /** Posting after dispose is a no-op (the webview is gone; VS Code would throw). */
  post(message: HostToWebview): void {
    if (this.disposed) return;
    void this.panel.webview.postMessage(message);
  }

  update(payload: PanelPayload): void {
    this.payloadValue = payload;
    if (this.disposed) return;
    this.panel.title = payload.title;
    this.post({ type: 'show', payload });
  }

  private pngRequests = new Map<number, { resolve: (bytes: Uint8Array) => void; reject: (e: Error) => void }>();
  private nextRequest = 1;

  /** Asks the webview to draw a standalone SVG on its canvas; resolves with the PNG bytes. */
  renderPng(svg: string, scale = 2): Promise<Uint8Array> {
    if (this.disposed) return Promise.reject(new Error('the panel is closed'));
    const requestId = this.nextRequest++;
    return new Promise((resolve, reject) => {
      this.pngRequests.set(requestId, { resolve, reject });
      this.post({ type: 'render-png', requestId, svg, scale });
      setTimeout(() => {
        if (this.pngRequests.delete(requestId)) reject(new Error('the panel did not answer within 10 s'));
      }, 10_000);
    });
  }

  private async receive(message: unknown): Promise<void> {
    if (this.disposed || !isWebviewToHost(message)) return;
    if (message.type === 'ready') return;
    if (message.type === 'png') {
      const pending = this.pngRequests.get(message.requestId);
      this.pngRequests.delete(message.requestId);
      if (!pending) return;
      const match = /^data:image\/png;base64,(.+)$/.exec(message.dataUrl ?? '');
      if (match) pending.resolve(new Uint8Array(Buffer.from(match[1], 'base64')));
      else pending.reject(new Error(message.error ?? 'no PNG'));
      return;
    }
    try {
      if (message.type === 'save-plot') await this.actions.onSavePlot(message.index, this);
      else if (message.type === 'copy-table') await this.actions.onCopyTable(message.index, this);
      else await this.actions.onAction(message.action, this);
    } catch (e) {
      this.post({ type: 'status', text: errorMessage(e), level: 'error' });
    }
  }

  dispose(): void {
    if (this.disposed) return;
    this.disposed = true;
    this.onDispose(this);
    for (const d of this.disposables) d.dispose();
  }
}

export class PanelManager implements vscode.WebviewPanelSerializer<PanelState> {
  private readonly open = new Set<ResultPanel>();
  private lastActive: ResultPanel | undefined;

  constructor(
    private readonly extensionUri: vscode.Uri,
    private readonly actions: PanelActions,
  ) {}

  private options(): vscode.WebviewOptions & vscode.WebviewPanelOptions {
    return { enableScripts: true, localResourceRoots: [vscode.Uri.joinPath(this.extensionUri, 'dist')], retainContextWhenHidden: false, enableFindWidget: true };
  }

  show(payload: PanelPayload, reuse?: ResultPanel): ResultPanel {
    if (reuse && !reuse.isDisposed) {
      // A hidden panel's webview is gone (no retained context) and would drop the message: its page is
      // rebuilt with the new result as the initial state, which the webview prefers to an older saved one.
      if (!reuse.panel.visible) reuse.panel.webview.html = panelHtml(reuse.panel.webview, this.extensionUri, { payload });
      reuse.update(payload);
      reuse.panel.reveal(undefined, true);
      return reuse;
    }
    const panel = vscode.window.createWebviewPanel(PANEL_VIEW_TYPE, payload.title, { viewColumn: this.resultColumn(), preserveFocus: false }, this.options());
    return this.adopt(panel, payload);
  }

  private adopt(panel: vscode.WebviewPanel, payload: PanelPayload): ResultPanel {
    panel.iconPath = vscode.Uri.joinPath(this.extensionUri, 'media', 'icon.svg');
    panel.webview.options = this.options();
    panel.webview.html = panelHtml(panel.webview, this.extensionUri, { payload });
    const result = new ResultPanel(panel, payload, this.actions, (p) => {
      this.open.delete(p);
      if (this.lastActive === p) this.lastActive = undefined;
    });
    this.open.add(result);
    this.lastActive = result;
    panel.onDidChangeViewState((e) => { if (e.webviewPanel.active) this.lastActive = result; });
    return result;
  }

  /** Restores a panel after a reload from the state its webview saved. */
  async deserializeWebviewPanel(panel: vscode.WebviewPanel, state: PanelState | undefined): Promise<void> {
    if (!state?.payload) {
      panel.dispose();
      return;
    }
    this.adopt(panel, state.payload);
  }

  /** New results join the column results already occupy (as tabs), instead of opening a column each. */
  private resultColumn(): vscode.ViewColumn {
    return [...this.open].reverse().find((p) => !p.isDisposed && p.panel.viewColumn !== undefined)?.panel.viewColumn ?? vscode.ViewColumn.Beside;
  }

  /** The open panel that shows this source's result (pinned copies excluded), if any. */
  forSource(key: string): ResultPanel | undefined {
    return [...this.open].reverse().find((p) => !p.pinned && !p.isDisposed && sourceKey(p.payload) === key);
  }

  /** "Open in new panel": a copy of the result in a panel of its own that later runs never replace. */
  openCopy(payload: PanelPayload): ResultPanel {
    const panel = vscode.window.createWebviewPanel(PANEL_VIEW_TYPE, payload.title, { viewColumn: this.resultColumn(), preserveFocus: false }, this.options());
    const copy = this.adopt(panel, payload);
    copy.pinned = true;
    return copy;
  }

  get active(): ResultPanel | undefined {
    return this.lastActive;
  }

  get all(): readonly ResultPanel[] {
    return [...this.open];
  }

  dispose(): void {
    for (const p of [...this.open]) p.panel.dispose();
  }
}
