// Tokenizes every example of the notation (grammar/examples) with the
// TextMate grammar and fails when a token gets an `invalid` scope, so the
// highlighter accepts everything the formal grammar accepts.  Files under
// grammar/examples/flagged/ must instead contain at least one invalid token:
// they hold forms that parse but that stoik reports (the resonance arrows).
'use strict';

const fs = require('fs');
const path = require('path');
const vsctm = require('vscode-textmate');
const oniguruma = require('vscode-oniguruma');

const grammarPath = path.join(__dirname, '..', 'stoik.tmLanguage.json');
const examplesDir = path.join(__dirname, '..', '..', '..', 'grammar', 'examples');

function listStoikFiles(dir) {
  const found = [];
  for (const entry of fs.readdirSync(dir, { withFileTypes: true })) {
    const full = path.join(dir, entry.name);
    if (entry.isDirectory()) {
      found.push(...listStoikFiles(full));
    } else if (entry.name.endsWith('.stoik')) {
      found.push(full);
    }
  }
  return found.sort();
}

// Returns a list of "line:column text scope" strings, one per invalid token.
function invalidTokens(grammar, text) {
  const found = [];
  let ruleStack = vsctm.INITIAL;
  const lines = text.split(/\r?\n/);
  lines.forEach((line, index) => {
    const result = grammar.tokenizeLine(line, ruleStack);
    for (const token of result.tokens) {
      const bad = token.scopes.find((scope) => scope.startsWith('invalid'));
      if (bad) {
        const piece = line.slice(token.startIndex, token.endIndex);
        found.push(`${index + 1}:${token.startIndex + 1} ${JSON.stringify(piece)} ${bad}`);
      }
    }
    ruleStack = result.ruleStack;
  });
  return found;
}

async function main() {
  const wasm = fs.readFileSync(require.resolve('vscode-oniguruma/release/onig.wasm'));
  await oniguruma.loadWASM(wasm.buffer.slice(wasm.byteOffset, wasm.byteOffset + wasm.byteLength));
  const registry = new vsctm.Registry({
    onigLib: Promise.resolve({
      createOnigScanner: (patterns) => new oniguruma.OnigScanner(patterns),
      createOnigString: (s) => new oniguruma.OnigString(s),
    }),
    loadGrammar: async () =>
      vsctm.parseRawGrammar(fs.readFileSync(grammarPath, 'utf8'), grammarPath),
  });
  const grammar = await registry.loadGrammar('source.stoik');

  const files = listStoikFiles(examplesDir);
  if (files.length === 0) {
    console.error(`no .stoik files under ${examplesDir}`);
    process.exit(1);
  }
  let failures = 0;
  for (const file of files) {
    const relative = path.relative(examplesDir, file);
    const flagged = relative.split(path.sep)[0] === 'flagged';
    const bad = invalidTokens(grammar, fs.readFileSync(file, 'utf8'));
    if (flagged && bad.length === 0) {
      failures += 1;
      console.error(`✖ ${relative}: expected an invalid token, found none`);
    } else if (!flagged && bad.length > 0) {
      failures += 1;
      console.error(`✖ ${relative}: invalid tokens\n  ${bad.join('\n  ')}`);
    } else {
      console.log(`✓ ${relative}`);
    }
  }
  if (failures > 0) {
    process.exit(1);
  }
}

main().catch((error) => {
  console.error(error);
  process.exit(1);
});
