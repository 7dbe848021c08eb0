// The VS Code client for stoik: it starts `stoik lsp` over stdio for .stoik
// files and forwards the extension's settings to the server.  All analysis
// (diagnostics, inlay hints, hover, code actions) happens in the server; this
// file only launches it, restarts it when its path changes, and offers a
// restart command.

import * as vscode from 'vscode';
import {
  LanguageClient,
  LanguageClientOptions,
  ServerOptions,
  TransportKind,
} from 'vscode-languageclient/node';

const SECTION = 'stoik';

let client: LanguageClient | undefined;

// The binary to launch: the `stoik.path` setting, with a leading `~`
// expanded, or `stoik` looked up on PATH.
function serverCommand(): string {
  const configured = vscode.workspace.getConfiguration(SECTION).get<string>('path', 'stoik').trim();
  if (configured === '') {
    return 'stoik';
  }
  if (configured.startsWith('~/') && process.env.HOME) {
    return process.env.HOME + configured.slice(1);
  }
  return configured;
}

function inlayHintsEnabled(): boolean {
  return vscode.workspace.getConfiguration(SECTION).get<boolean>('inlayHints.enable', true);
}

// Settings the server reads at start-up; it receives later changes through
// workspace/didChangeConfiguration for the `stoik` section.
function initializationOptions(): Record<string, unknown> {
  return {
    inlayHints: { enable: inlayHintsEnabled() },
  };
}

function createClient(output: vscode.OutputChannel): LanguageClient {
  const command = serverCommand();
  const serverOptions: ServerOptions = {
    run: { command, args: ['lsp'], transport: TransportKind.stdio },
    debug: { command, args: ['lsp'], transport: TransportKind.stdio },
  };
  const clientOptions: LanguageClientOptions = {
    documentSelector: [
      { scheme: 'file', language: 'stoik' },
      { scheme: 'untitled', language: 'stoik' },
    ],
    synchronize: {
      configurationSection: SECTION,
      fileEvents: vscode.workspace.createFileSystemWatcher('**/{*.stoik,stoik.toml}'),
    },
    initializationOptions: initializationOptions(),
    middleware: {
      // The setting also works against a server that ignores it: hints are
      // simply not asked for while it is off.
      provideInlayHints: (document, range, token, next) =>
        inlayHintsEnabled() ? next(document, range, token) : [],
    },
    outputChannel: output,
    // `stoik.trace.server` is read by the client library itself, because the
    // client id below is `stoik`.
  };
  return new LanguageClient(SECTION, 'stoik', serverOptions, clientOptions);
}

async function startClient(output: vscode.OutputChannel): Promise<void> {
  client = createClient(output);
  try {
    await client.start();
  } catch (error) {
    const message = error instanceof Error ? error.message : String(error);
    void vscode.window.showErrorMessage(
      `stoik: could not start "${serverCommand()} lsp" (${message}). ` +
        'Install stoik or set "stoik.path" to the binary.',
    );
    client = undefined;
  }
}

async function stopClient(): Promise<void> {
  const running = client;
  client = undefined;
  if (running) {
    await running.stop();
  }
}

export async function activate(context: vscode.ExtensionContext): Promise<void> {
  const output = vscode.window.createOutputChannel('stoik');
  context.subscriptions.push(output);

  context.subscriptions.push(
    vscode.commands.registerCommand('stoik.restartServer', async () => {
      await stopClient();
      await startClient(output);
    }),
  );

  // A new binary path needs a new server process; other settings reach the
  // running server as configuration changes.
  context.subscriptions.push(
    vscode.workspace.onDidChangeConfiguration(async (event) => {
      if (event.affectsConfiguration(`${SECTION}.path`)) {
        await stopClient();
        await startClient(output);
      }
    }),
  );

  await startClient(output);
}

export async function deactivate(): Promise<void> {
  await stopClient();
}
