// Copies the shared TextMate grammar (editors/textmate) into this extension,
// so that one file stays the source of truth and the packaged extension is
// self-contained.
'use strict';

const fs = require('fs');
const path = require('path');

const source = path.join(__dirname, '..', '..', 'textmate', 'stoik.tmLanguage.json');
const targetDir = path.join(__dirname, '..', 'syntaxes');
fs.mkdirSync(targetDir, { recursive: true });
fs.copyFileSync(source, path.join(targetDir, 'stoik.tmLanguage.json'));
