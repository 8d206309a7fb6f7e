// Help pages of the cell functions, generated at build time from functions.json (which the metadata
// plugin generates from the JSDoc tags): dist/help/<ID>.html for every function and
// dist/help/index.html listing them. Served with the add-in, so `@helpurl
// https://localhost:3000/help/<ID>.html` in a function's JSDoc opens its page from Excel (a build
// for another address, MIXGAP_BASE_URL, rewrites that link to it: ./deployment.js).
'use strict';

const fs = require('fs');
const path = require('path');

/**
 * A module of src/ loaded from its TypeScript source at build time (each file transpiled on its
 * own by the TypeScript compiler the build already uses; such modules import only each other and
 * plain modules of src/, nothing bundled).
 */
function loadSource(relative) {
  const ts = require('typescript');
  const cache = new Map();
  const load = (file) => {
    if (cache.has(file)) return cache.get(file).exports;
    const module = { exports: {} };
    cache.set(file, module);
    const source = fs.readFileSync(file, 'utf8');
    const { outputText } = ts.transpileModule(source, { compilerOptions: { module: ts.ModuleKind.CommonJS, target: ts.ScriptTarget.ES2020 } });
    const localRequire = (name) => {
      if (!name.startsWith('.')) return require(name);
      const base = path.resolve(path.dirname(file), name);
      const found = [`${base}.ts`, path.join(base, 'index.ts')].find((f) => fs.existsSync(f));
      if (!found) throw new Error(`help pages: cannot find ${name} from ${file}`);
      return load(found);
    };
    new Function('exports', 'require', 'module', outputText)(module.exports, localRequire, module);
    return module.exports;
  };
  return load(path.join(__dirname, '..', '..', relative));
}

/** The model families of src/core/models/index.ts. */
const loadFamilies = () => loadSource('core/models/index.ts').FAMILIES;

/** The three-component families of src/core/ternary/families.ts (loaded once, when a page needs them). */
let ternaryFamilies;
const loadTernaryFamilies = () => (ternaryFamilies ??= loadSource('core/ternary/families.ts').TERNARY_FAMILIES);

const { NAMESPACE } = loadSource('functions/namespace.ts');

/** Plain text of the registry with `_k`, `_ij` as subscripts. */
const withSubscripts = (text) => escapeHtml(text).replace(/_([A-Za-z0-9]+)/g, '<sub>$1</sub>');

/** The rows of the card-key table: one per key row of each model family. */
function familyRows(families) {
  const keys = (list) => list.map((k) => (k === '...' ? '…' : `<code>${escapeHtml(k)}</code>`)).join(', ');
  return families.flatMap((f) => f.keyRows.map((r) => `  <tr><td>${keys(r.keys)}</td><td>${escapeHtml(f.name)}</td><td>${withSubscripts(r.meaning)}</td></tr>`));
}

/** The model row: every family's name (and its aliases). */
function modelRow(families) {
  const names = families.map((f) => `<code>${escapeHtml(f.name)}</code>${f.aliases.length ? ` (or ${f.aliases.map((a) => `<code>${escapeHtml(a)}</code>`).join(', ')})` : ''}`);
  return `  <tr><td><code>model</code></td><td>all</td><td>${names.join(', ')}</td></tr>`;
}

const escapeHtml = (text) => String(text)
  .replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');

/** What a parameter accepts, in words. */
function kindOf(p) {
  if (p.dimensionality === 'matrix') return 'range, inline array or single value';
  return { number: 'number', string: 'text', boolean: 'TRUE or FALSE', any: 'number or text' }[p.type] || p.type;
}

function signature(f) {
  return `=${NAMESPACE}.${f.name}(${f.parameters.map((p) => (p.optional ? `[${p.name}]` : p.name)).join(', ')})`;
}

const STYLE = `
body { font-family: "Segoe UI", system-ui, sans-serif; max-width: 52rem; margin: 1.5rem auto; padding: 0 1rem; color: #1b1b1b; line-height: 1.45; }
code, pre { font-family: Consolas, "DejaVu Sans Mono", monospace; }
pre { background: #f3f5f8; padding: .6rem .8rem; overflow-x: auto; }
table { border-collapse: collapse; width: 100%; margin: .5rem 0 1rem; }
th, td { border: 1px solid #ccd3dc; padding: .35rem .5rem; text-align: left; vertical-align: top; }
th { background: #eef2f7; }
.caution { border-left: 4px solid #c0392b; padding: .3rem .8rem; background: #fdf3f2; }
nav a { margin-right: .8rem; }`;

const units = (families) => `
<h2>Units</h2>
<ul>
  <li><b>Temperatures</b> are in kelvin, unless the parameter card has the row <code>temperature | °C</code>: then every temperature the functions read and return is in degrees Celsius. Temperatures inside model parameters (the <code>b</code> of L<sub>k</sub>, <code>chi.B</code>, <code>b12</code>, <code>b21</code>) are always in kelvin.</li>
  <li><b>Energies</b> are in J/mol, unless the card has <code>energy | kJ/mol</code>, <code>cal/mol</code>, <code>kcal/mol</code> or <code>eV/atom</code>: then energy parameters and results are in that unit.</li>
  <li><b>Compositions</b> are mole fractions of component B (volume fractions of B for Flory–Huggins cards), strictly between 0 and 1.</li>
</ul>
<h2>Parameter cards</h2>
<p>The <code>params</code> argument is a two-column range of keys and values, for example <code>Card!$A$1:$B$5</code>, or a single number (a regular solution's Omega in J/mol), or rows of Redlich–Kister a, b, c (J/mol, J/(mol K), J/(mol K)).</p>
<table>
  <tr><th>key</th><th>model</th><th>value</th></tr>
${modelRow(families)}
${familyRows(families).join('\n')}
  <tr><td><code>energy</code>, <code>temperature</code></td><td>all</td><td>units, see above</td></tr>
  <tr><td><code>name A</code>, <code>name B</code></td><td>all</td><td>names of the components, used in messages</td></tr>
</table>
<h3>Three-component cards</h3>
<p>A card with the keys of a pair (<code>AB.</code>, <code>AC.</code>, <code>BC.</code> before a binary card's key), a ternary term (<code>ABC.</code>), <code>NC</code> or <code>name C</code> describes three components A, B and C, for the three-component functions (TPHASES, TSPLIT, TDIST, TSELECT, TPLAIT, TTRIANGLE, TACTIVITY, TCHEMPOT, TGMIX). Every pair must be given; units and names as above.</p>
<table>
  <tr><th>key</th><th>model</th><th>value</th></tr>
${familyRows(loadTernaryFamilies()).join('\n')}
  <tr><td><code>name C</code></td><td>all</td><td>name of the third component</td></tr>
</table>
<p><code>=${NAMESPACE}.CHECKCARD(range)</code> says in one line how a card was read.</p>
<h2>Errors</h2>
<ul>
  <li><code>#VALUE!</code>: an argument or card row is of the wrong kind; the message says which.</li>
  <li><code>#NUM!</code>: a number is out of range (for example T not above absolute zero), or a solve did not converge.</li>
  <li><code>#N/A</code>: the thing asked for does not exist at that point, for example no miscibility gap at that temperature.</li>
</ul>
<p class="caution"><b>Caution.</b> Results come from a solution model and its parameters and are estimates of equilibrium. Where they feed decisions that can hurt someone, such as heat-treating parts or running hot or flammable solvents in a decanter, check them against measurements and follow the codes, standards and licensed professional practice that apply where you work.</p>`;

function page(title, body) {
  return `<!doctype html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>${escapeHtml(title)}</title>
<style>${STYLE}
</style>
</head>
<body>
<nav><a href="index.html">All Mixgap functions</a></nav>
${body}
</body>
</html>
`;
}

/** One help page for a function of functions.json. */
function functionPage(f, families) {
  const rows = f.parameters.map((p) => `  <tr><td><code>${escapeHtml(p.name)}</code></td><td>${p.optional ? 'optional' : 'required'}</td><td>${escapeHtml(kindOf(p))}</td><td>${escapeHtml(p.description || '')}</td></tr>`);
  const result = f.result && f.result.dimensionality === 'matrix'
    ? 'A table: the formula spills over the cells below and to the right of it.'
    : 'One value.';
  return page(`${NAMESPACE}.${f.name}`, `<h1>${NAMESPACE}.${escapeHtml(f.name)}</h1>
<pre>${escapeHtml(signature(f))}</pre>
<p>${escapeHtml((f.description || '').replace(/\s+/g, ' ').trim())}</p>
<h2>Arguments</h2>
<table>
  <tr><th>argument</th><th></th><th>accepts</th><th>meaning and unit</th></tr>
${rows.join('\n')}
</table>
<h2>Result</h2>
<p>${result}</p>
${units(families)}`);
}

function indexPage(functions, families) {
  const items = functions.map((f) => `  <tr><td><a href="${encodeURIComponent(f.id.toUpperCase())}.html"><code>${NAMESPACE}.${escapeHtml(f.name)}</code></a></td><td>${escapeHtml((f.description || '').replace(/\s+/g, ' ').trim())}</td></tr>`);
  return page('Mixgap functions', `<h1>Mixgap cell functions</h1>
<table>
  <tr><th>function</th><th>what it gives</th></tr>
${items.join('\n')}
</table>
${units(families)}`);
}

/** File name (under help/) -> HTML, for the functions of a functions.json. */
function helpPages(metadata, families = loadFamilies()) {
  const pages = { 'index.html': indexPage(metadata.functions, families) };
  for (const f of metadata.functions) pages[`${f.id.toUpperCase()}.html`] = functionPage(f, families);
  return pages;
}

/** Webpack plugin: emits help/<ID>.html and help/index.html from the functions.json asset. */
class HelpPagesPlugin {
  constructor(options = {}) {
    this.metadataAsset = options.metadata || 'functions.json';
    this.folder = options.folder || 'help';
  }

  apply(compiler) {
    const { Compilation, sources, WebpackError } = compiler.webpack;
    compiler.hooks.thisCompilation.tap('HelpPagesPlugin', (compilation) => {
      compilation.hooks.processAssets.tap({ name: 'HelpPagesPlugin', stage: Compilation.PROCESS_ASSETS_STAGE_DERIVED }, () => {
        const asset = compilation.getAsset(this.metadataAsset);
        if (!asset) {
          compilation.errors.push(new WebpackError(`HelpPagesPlugin: no ${this.metadataAsset} to make help pages from`));
          return;
        }
        const pages = helpPages(JSON.parse(asset.source.source().toString()));
        for (const [file, html] of Object.entries(pages)) {
          compilation.emitAsset(`${this.folder}/${file}`, new sources.RawSource(html));
        }
      });
    });
  }
}

module.exports = { HelpPagesPlugin, helpPages, loadFamilies };
