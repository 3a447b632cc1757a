// deckward for VS Code: the `deck` language (registered in package.json,
// highlighted by syntaxes/deck.tmLanguage.json) and a client that starts
// the deckward language server (`deckward serve`, over standard input and
// output) for every deck of the window.
"use strict";
const vscode = require("vscode");
const { LanguageClient, TransportKind } = require("vscode-languageclient/node");

let client;

function serverCommand() {
  const configured = vscode.workspace.getConfiguration("deckward").get("server.command");
  const command = Array.isArray(configured) && configured.length > 0 ? configured : ["deckward", "serve"];
  return { command: command[0], args: command.slice(1), transport: TransportKind.stdio };
}

async function activate(context) {
  const server = serverCommand();
  client = new LanguageClient(
    "deckward",
    "deckward",
    { run: server, debug: server },
    {
      documentSelector: [
        { scheme: "file", language: "deck" },
        { scheme: "untitled", language: "deck" },
      ],
      synchronize: {
        // The server re-reads the configuration and the decks a deck uses.
        fileEvents: vscode.workspace.createFileSystemWatcher("**/{deckward.yaml,*.deck}"),
      },
    },
  );
  context.subscriptions.push(
    vscode.commands.registerCommand("deckward.restartServer", () => client.restart()),
  );
  try {
    await client.start();
  } catch (err) {
    vscode.window.showErrorMessage(
      `deckward: could not start \`${[server.command, ...server.args].join(" ")}\` (${err.message}). ` +
        "Install deckward (pip install deckward) or set deckward.server.command.",
    );
  }
}

function deactivate() {
  return client ? client.stop() : undefined;
}

module.exports = { activate, deactivate };
