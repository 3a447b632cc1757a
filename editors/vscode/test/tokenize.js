// Tokenizes deck files with the extension's TextMate grammar, the way VS
// Code does (vscode-textmate on the Oniguruma regular-expression engine),
// and prints, per file, each token as [line, start, end, scopes] with
// 0-based lines and UTF-16 columns.  The project's tests compare these
// scopes with what deckward's own parser says each token is.
"use strict";
const fs = require("fs");
const path = require("path");
const vsctm = require("vscode-textmate");
const oniguruma = require("vscode-oniguruma");

const HERE = path.join(__dirname, "..");

async function registry() {
  const wasm = fs.readFileSync(path.join(path.dirname(require.resolve("vscode-oniguruma")), "onig.wasm"));
  await oniguruma.loadWASM(wasm.buffer.slice(wasm.byteOffset, wasm.byteOffset + wasm.byteLength));
  return new vsctm.Registry({
    onigLib: Promise.resolve({
      createOnigScanner: (patterns) => new oniguruma.OnigScanner(patterns),
      createOnigString: (s) => new oniguruma.OnigString(s),
    }),
    loadGrammar: async (scopeName) => {
      if (scopeName !== "source.deck") return null;
      const file = path.join(HERE, "syntaxes", "deck.tmLanguage.json");
      return vsctm.parseRawGrammar(fs.readFileSync(file, "utf8"), file);
    },
  });
}

async function tokenizeFile(grammar, file) {
  const lines = fs.readFileSync(file, "utf8").split("\n");
  let stack = vsctm.INITIAL;
  const out = [];
  lines.forEach((line, i) => {
    const result = grammar.tokenizeLine(line, stack);
    for (const t of result.tokens) out.push([i, t.startIndex, Math.min(t.endIndex, line.length), t.scopes]);
    stack = result.ruleStack;
  });
  return out;
}

async function main() {
  const grammar = await (await registry()).loadGrammar("source.deck");
  const result = {};
  for (const file of process.argv.slice(2)) result[file] = await tokenizeFile(grammar, file);
  process.stdout.write(JSON.stringify(result) + "\n");
}

main().catch((err) => {
  process.stderr.write(String(err && err.stack ? err.stack : err) + "\n");
  process.exit(1);
});
