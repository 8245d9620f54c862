import { randomBytes } from 'node:crypto';
import * as vscode from 'vscode';
import type { PanelState } from '../protocol';
import { STYLE } from './panelStyle';

/** Escapes text for a double-quoted HTML attribute (the initial state travels as JSON in data-initial). */
export function escapeAttribute(text: string): string {
  return text.replace(/&/g, '&amp;').replace(/"/g, '&quot;').replace(/'/g, '&#39;').replace(/</g, '&lt;').replace(/>/g, '&gt;');
}


export function panelHtml(webview: vscode.Webview, extensionUri: vscode.Uri, state: PanelState | undefined): string {
  const nonce = randomBytes(16).toString('base64');
  const dist = vscode.Uri.joinPath(extensionUri, 'dist');
  const script = webview.asWebviewUri(vscode.Uri.joinPath(dist, 'webview.js'));
  const codicons = webview.asWebviewUri(vscode.Uri.joinPath(dist, 'codicon.css'));
  const csp = [
    "default-src 'none'",
    `img-src ${webview.cspSource} data:`,
    `font-src ${webview.cspSource}`,
    `style-src ${webview.cspSource} 'nonce-${nonce}'`,
    `script-src 'nonce-${nonce}'`,
  ].join('; ');
  const initial = state ? escapeAttribute(JSON.stringify(state)) : '';
  return `<!DOCTYPE html>
<html lang="${escapeAttribute(vscode.env.language)}">
<head>
<meta charset="UTF-8">
<meta http-equiv="Content-Security-Policy" content="${csp}">
<meta name="viewport" content="width=device-width, initial-scale=1.0">
<link rel="stylesheet" href="${codicons}" nonce="${nonce}">
<style nonce="${nonce}">${STYLE}</style>
<title>Countercheck</title>
</head>
<body>
<main id="root" data-initial="${initial}" aria-busy="true"></main>
<script nonce="${nonce}" src="${script}"></script>
</body>
</html>`;
}
