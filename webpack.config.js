// Two builds from one source tree:
//  - web:  the Excel custom-functions runtime page (dist/functions.{js,html,json} + dist/assets
//          + dist/help/<ID>.html + dist/manifest.xml); `npm start` serves it at
//          https://localhost:3000 (devServer below). MIXGAP_BASE_URL=https://host/folder/ builds it
//          for that address instead: every URL of the add-in follows (src/hosts/excel/deployment.js).
//  - node: the `mixgap` command (dist/node/cli.js), which reads dist/functions.json at run time.
const fs = require('fs');
const os = require('os');
const path = require('path');
const CustomFunctionsMetadataPlugin = require('custom-functions-metadata-plugin');
const HtmlWebpackPlugin = require('html-webpack-plugin');
const CopyWebpackPlugin = require('copy-webpack-plugin');
const { HelpPagesPlugin } = require('./src/hosts/excel/help-pages.js');
const { BASE_VARIABLE, DEV_BASE, DeploymentPlugin, baseAddress } = require('./src/hosts/excel/deployment.js');
const { version } = require('./package.json');

const dist = path.resolve(__dirname, 'dist');
const functionsEntry = './src/functions/index.ts';
const functionSources = require('./src/functions/sources.js').map((f) => `./src/functions/${f}`);

const typescriptRule = {
  test: /\.ts$/,
  exclude: /node_modules/,
  use: {
    loader: 'ts-loader',
    // Type-check only what is bundled; `npx tsc --noEmit` checks the whole tree (tests included).
    options: { onlyCompileBundledFiles: true },
  },
};

const common = (argv) => ({
  mode: argv.mode === 'development' ? 'development' : 'production',
  devtool: 'source-map',
  resolve: { extensions: ['.ts', '.js'] },
  module: { rules: [typescriptRule] },
});

/** The address the web build is for: `npm start` always serves at DEV_BASE. */
function webBase() {
  if (!process.env.WEBPACK_SERVE) return baseAddress(process.env[BASE_VARIABLE]);
  if (process.env[BASE_VARIABLE]) console.warn(`${BASE_VARIABLE} is ignored by npm start, which serves at ${DEV_BASE}`);
  return DEV_BASE;
}

const web = (env, argv) => ({
  ...common(argv),
  name: 'web',
  target: 'web',
  entry: { functions: functionsEntry },
  // The bundle carries mathjs's unit system (about 250 KiB minified in all); it loads once per session.
  performance: { maxAssetSize: 400 * 1024, maxEntrypointSize: 400 * 1024 },
  output: {
    path: dist,
    filename: '[name].js',
    clean: { keep: /^node\// },
  },
  plugins: [
    // functions.json is generated from the JSDoc @customfunction tags, never written by hand.
    new CustomFunctionsMetadataPlugin({ output: 'functions.json', input: functionSources }),
    new HtmlWebpackPlugin({
      filename: 'functions.html',
      template: './src/hosts/excel/functions.html',
      chunks: ['functions'],
      inject: 'body',
      scriptLoading: 'blocking',
    }),
    new CopyWebpackPlugin({
      patterns: [{ from: 'assets/*.png', to: 'assets/[name][ext]' }],
    }),
    // help/<ID>.html for every function of functions.json, and help/index.html.
    new HelpPagesPlugin(),
    // Every URL for the address of this build; manifest.xml with it and the package's version.
    new DeploymentPlugin({ base: webBase(), version, template: path.resolve(__dirname, 'manifest.xml') }),
  ],
  // Only `webpack serve` (npm start) reads this, and with it the development certificates.
  ...(process.env.WEBPACK_SERVE ? { devServer: devServer() } : {}),
});

/**
 * `npm start`: dist/ at https://localhost:3000, the origin every URL of manifest.xml names, with the
 * certificates office-addin-dev-certs made in ~/.office-addin-dev-certs (read here, not through the
 * tool's helper, whose trust step needs sudo). The build is also written to dist/.
 */
function devServer() {
  const folder = path.join(os.homedir(), '.office-addin-dev-certs');
  const read = (name) => {
    const file = path.join(folder, name);
    if (!fs.existsSync(file)) {
      throw new Error(`${file} is missing: run \`npx office-addin-dev-certs install\` (npm start does it first)`);
    }
    return fs.readFileSync(file);
  };
  return {
    host: 'localhost',
    port: 3000,
    server: { type: 'https', options: { ca: read('ca.crt'), cert: read('localhost.crt'), key: read('localhost.key') } },
    headers: { 'Access-Control-Allow-Origin': '*' },
    static: false,
    devMiddleware: { writeToDisk: true },
    // The custom-functions runtime has no use for live reloading; no client script is injected.
    hot: false,
    liveReload: false,
    client: false,
    webSocketServer: false,
  };
}

/**
 * Packages bundled into the node build (all others are required from node_modules at run time):
 * - mathjs, tree-shaken to the unit system we use (as in the web bundle): required whole from
 *   node_modules it builds every function it has, about 70 MB at start-up;
 * - HyperFormula and the packages it needs: required from node_modules it is some 230 files to
 *   find and read, a good part of the start-up of `mixgap eval` (measured by `npm run bench`);
 * - mathjs's own dependencies and JSZip with its dependencies (the zip library of `mixgap calc`),
 *   for the same reason: about 40 files found and read at run time by `mixgap calc` otherwise.
 */
const BUNDLED = new RegExp(`^(${[
  'mathjs', 'decimal.js', 'fraction.js', 'complex.js', 'typed-function', '@babel/runtime', 'javascript-natural-sort', 'escape-latex', 'seedrandom',
  'hyperformula', 'chevrotain', 'regexp-to-ast', 'tiny-emitter',
  'jszip', 'pako', 'lie', 'immediate', 'setimmediate', 'readable-stream', 'core-util-is', 'inherits', 'isarray', 'process-nextick-args',
  'safe-buffer', 'string_decoder', 'util-deprecate',
].map((name) => name.replace(/[.]/g, '\\.')).join('|')})(/|$)`);

const node = (env, argv) => ({
  ...common(argv),
  name: 'node',
  target: 'node20',
  // HyperFormula's CommonJS build: in its ES build, bundled here without scope hoisting (the
  // command's chunks are split), every use of a name from another of its modules calls a getter,
  // some 6 % of the time of `mixgap calc` on a big workbook; the CommonJS build reads properties.
  resolve: { ...common(argv).resolve, alias: { hyperformula$: require.resolve('hyperformula') } },
  entry: { cli: './src/hosts/cli.ts', bench: './bench/run.ts' },
  output: {
    path: path.join(dist, 'node'),
    filename: '[name].js',
    // The command loads what a subcommand needs when it runs (import() in cli.ts): those parts are
    // chunks beside cli.js, required from there.
    chunkFilename: 'chunk-[name].js',
    library: { type: 'commonjs2' },
    clean: true,
  },
  module: {
    rules: [typescriptRule],
    // createRequire(__filename).resolve(...) runs as written (it finds the packaged fonts at run time).
    parser: { javascript: { createRequire: false } },
  },
  // __dirname stays the bundle's own folder, so the CLI finds ../functions.json beside it.
  node: { __dirname: false, __filename: false },
  // Dependencies stay in node_modules and are required at run time, except BUNDLED (above).
  externalsPresets: { node: true },
  externals: [({ request }, callback) => {
    if (/^[a-z@][^:]*$/i.test(request) && !request.startsWith('.') && !BUNDLED.test(request)) {
      return callback(null, `commonjs ${request}`);
    }
    return callback();
  }],
  optimization: { minimize: false },
});

module.exports = [web, node];
