// Two builds from one source tree:
//  - web:  the Excel custom-functions runtime page (dist/functions.{js,html,json} + dist/assets)
//  - node: the `mixgap` command (dist/node/cli.js), which reads dist/functions.json at run time.
const path = require('path');
const CustomFunctionsMetadataPlugin = require('custom-functions-metadata-plugin');
const HtmlWebpackPlugin = require('html-webpack-plugin');
const CopyWebpackPlugin = require('copy-webpack-plugin');

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
  ],
});

const node = (env, argv) => ({
  ...common(argv),
  name: 'node',
  target: 'node20',
  entry: { cli: './src/hosts/cli.ts', bench: './bench/run.ts' },
  output: {
    path: path.join(dist, 'node'),
    filename: '[name].js',
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
  // Dependencies stay in node_modules and are required at run time.
  externalsPresets: { node: true },
  externals: [({ request }, callback) => {
    // mathjs is bundled (tree-shaken to the unit system we use, as in the web bundle): required
    // whole from node_modules it builds every function it has, about 70 MB at start-up.
    if (/^[a-z@][^:]*$/i.test(request) && !request.startsWith('.') && !request.startsWith('mathjs')) {
      return callback(null, `commonjs ${request}`);
    }
    return callback();
  }],
  optimization: { minimize: false },
});

module.exports = [web, node];
