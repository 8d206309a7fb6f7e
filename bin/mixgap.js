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

/**
 * V8's code cache for the bundle's files: the first run after a build leaves beside each file it
 * loads (dist/node/*.js) a FILE.js.cache with what V8 compiled (the file's functions that ran
 * included), and later runs start from it instead of compiling again (the engine's bundle alone is
 * some 2 MB of JavaScript, read at every start). A cache is used only for the very text it was made
 * from (its first 20 bytes: SHA-1 of the file and of the node version) and only if V8 accepts it;
 * anything else, or a folder that cannot be written, means compiling as usual. A file with an
 * import() of its own (the diagram's ES modules) is compiled as usual too: node runs import() only
 * in scripts it compiles itself.
 */
function useCodeCache(folder) {
  const crypto = require('crypto');
  const vm = require('vm');
  const Module = require('module');
  if (typeof Module.prototype._compile !== 'function' || typeof Module.wrap !== 'function') return;
  // import( as a call (not `x.import(`, not the bundler's `/* import() | chunk */` notes)
  const dynamicImport = /(?<![\w$.])import\s*\((?!\s*\))/;
  const prefix = folder + path.sep;
  const made = [];
  const compile = Module.prototype._compile;
  Module.prototype._compile = function (content, filename, ...rest) {
    if (!filename.startsWith(prefix) || !filename.endsWith('.js') || dynamicImport.test(content)) return compile.call(this, content, filename, ...rest);
    const cacheFile = `${filename}.cache`;
    const key = crypto.createHash('sha1').update(content).update(process.version).digest();
    let cachedData;
    try {
      const bytes = fs.readFileSync(cacheFile);
      if (bytes.length > key.length && bytes.subarray(0, key.length).equals(key)) cachedData = bytes.subarray(key.length);
    } catch {
      // no cache yet
    }
    const script = new vm.Script(Module.wrap(content), { filename, cachedData });
    if (!cachedData || script.cachedDataRejected) made.push({ script, cacheFile, key });
    const module = this;
    const require = (id) => module.require(id);
    require.resolve = (request, options) => Module._resolveFilename(request, module, false, options);
    require.main = process.mainModule;
    require.cache = Module._cache;
    return script.runInThisContext({ displayErrors: true })
      .call(module.exports, module.exports, require, module, filename, path.dirname(filename));
  };
  process.once('exit', () => {
    for (const { script, cacheFile, key } of made) {
      const tmp = `${cacheFile}.${process.pid}.tmp`;
      try {
        fs.writeFileSync(tmp, Buffer.concat([key, script.createCachedData()]));
        fs.renameSync(tmp, cacheFile); // whole or not at all, should two runs write at once
      } catch {
        try { fs.rmSync(tmp, { force: true }); } catch { /* nothing to clean */ }
      }
    }
  });
}
useCodeCache(path.dirname(bundle));

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
