#!/usr/bin/env node
'use strict';
// The `mixgap` command: a thin launcher for the bundled CLI in dist/node/cli.js.
const path = require('path');
const fs = require('fs');

const bundle = path.join(__dirname, '..', 'dist', 'node', 'cli.js');
if (!fs.existsSync(bundle)) {
  process.stderr.write('mixgap: the command is not built yet: run `npm run build` first\n');
  process.exit(2);
}
// A reader that stops early (`mixgap functions | head`) is not an error.
process.stdout.on('error', (err) => {
  if (err.code === 'EPIPE') process.exit(0);
  throw err;
});
require(bundle).main(process.argv).then(
  (code) => { process.exitCode = code; },
  (err) => {
    process.stderr.write(`mixgap: ${err && err.stack ? err.stack : err}\n`);
    process.exitCode = 1;
  },
);
