// The address the add-in is served from, set once at build time. Every URL of the add-in (the
// manifest's script, page, metadata, icons and support page; the help link of every function in
// functions.json) is written for https://localhost:3000/, the address of `npm start`; a build for
// another address rewrites that prefix in every file the web build emits, and writes
// dist/manifest.xml from manifest.xml with that address and the version of package.json.
'use strict';

const fs = require('fs');

/** The address of `npm start` (webpack serve), which manifest.xml and the JSDoc @helpurl tags name. */
const DEV_BASE = 'https://localhost:3000/';

/** The environment variable that gives the address of a build. */
const BASE_VARIABLE = 'MIXGAP_BASE_URL';

/**
 * The base address to build for: `text` (from MIXGAP_BASE_URL) as an https URL ending in "/", or
 * DEV_BASE when it is empty. Throws on anything Office would not load an add-in from.
 */
function baseAddress(text) {
  if (text === undefined || text.trim() === '') return DEV_BASE;
  let url;
  try {
    url = new URL(text.trim());
  } catch {
    throw new Error(`${BASE_VARIABLE}="${text}" is not a URL: give the address dist/ will be served from, e.g. https://addins.example.org/mixgap/`);
  }
  if (url.protocol !== 'https:') {
    throw new Error(`${BASE_VARIABLE}="${text}": Office loads add-ins over HTTPS only; give an https:// address`);
  }
  if (url.search || url.hash) throw new Error(`${BASE_VARIABLE}="${text}": give the address of a folder, without ? or #`);
  return url.href.endsWith('/') ? url.href : `${url.href}/`;
}

/**
 * The four-part version Office wants in a manifest (n.n.n.n) from package.json's `version`
 * (n.n.n, with an optional -prerelease or +build part, which the manifest cannot carry).
 */
function manifestVersion(version) {
  const m = /^(\d+)\.(\d+)\.(\d+)(?:[-+].*)?$/.exec(version);
  if (!m) throw new Error(`package.json version "${version}" is not of the form MAJOR.MINOR.PATCH`);
  // The manifest schema's Version type: up to four parts of at most 5 digits each.
  if (m.slice(1, 4).some((part) => part.length > 5)) throw new Error(`package.json version "${version}": a manifest version part has at most 5 digits`);
  return `${m[1]}.${m[2]}.${m[3]}.0`;
}

/** The manifest for `base` and `version`: every URL on DEV_BASE moved to `base`, <Version> replaced. */
function manifestFor(template, base, version) {
  if (!/<Version>[^<]*<\/Version>/.test(template)) throw new Error('manifest.xml has no <Version> element');
  return template.split(DEV_BASE).join(base)
    .replace(/<Version>[^<]*<\/Version>/, `<Version>${manifestVersion(version)}</Version>`)
    // The template's note about the development address does not apply to the built copy.
    .replace(/<!--[\s\S]*?-->/, `<!-- Mixgap ${version}: add-in-only manifest for Excel custom functions, served from ${base}. Built from manifest.xml. -->`);
}

/** Assets whose text may name the address (everything else is copied as it is). */
const TEXT_ASSET = /\.(js|json|html|map|xml|txt|css)$/i;

/**
 * Webpack plugin for the web build: rewrites DEV_BASE to `base` in every text asset and emits
 * manifest.xml (from `template`, a file path) for `base` and `version`.
 */
class DeploymentPlugin {
  constructor({ base, version, template }) {
    this.base = base;
    this.version = version;
    this.template = template;
  }

  apply(compiler) {
    const { Compilation, sources } = compiler.webpack;
    compiler.hooks.thisCompilation.tap('DeploymentPlugin', (compilation) => {
      compilation.fileDependencies.add(this.template);
      // After every other asset is made (source maps at DEV_TOOLING, the page at OPTIMIZE_INLINE).
      compilation.hooks.processAssets.tap({ name: 'DeploymentPlugin', stage: Compilation.PROCESS_ASSETS_STAGE_OPTIMIZE_INLINE + 1 }, () => {
        if (this.base !== DEV_BASE) {
          for (const asset of compilation.getAssets()) {
            if (!TEXT_ASSET.test(asset.name)) continue;
            const text = asset.source.source().toString();
            if (text.includes(DEV_BASE)) compilation.updateAsset(asset.name, new sources.RawSource(text.split(DEV_BASE).join(this.base)));
          }
        }
        const manifest = manifestFor(fs.readFileSync(this.template, 'utf8'), this.base, this.version);
        compilation.emitAsset('manifest.xml', new sources.RawSource(manifest));
      });
    });
  }
}

module.exports = { BASE_VARIABLE, DEV_BASE, DeploymentPlugin, baseAddress, manifestFor, manifestVersion };
