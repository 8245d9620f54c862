import * as vscode from 'vscode';

export function activate(_context: vscode.ExtensionContext): { activationMs: number } {
  return { activationMs: 0 };
}

export function deactivate(): void {}
