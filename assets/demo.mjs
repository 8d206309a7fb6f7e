// `npm run demo`: computes the demo workbook (assets/demo.xlsx, an invented scenario) with
// `mixgap calc` and draws with `mixgap diagram`, all into out/demo/: the alloy's phase diagram, the
// fitted blend's binodal with its uncertainty band, and the extraction card's composition triangle.
// Needs the build (npm ci runs it).
import { existsSync } from 'fs';
import { createRequire } from 'module';
import path from 'path';
import { fileURLToPath } from 'url';

const root = path.join(path.dirname(fileURLToPath(import.meta.url)), '..');
const bundle = path.join(root, 'dist', 'node', 'cli.js');
if (!existsSync(bundle)) {
  console.error('npm run demo: the command is not built yet: run `npm ci` or `npm run build` first');
  process.exit(2);
}
const { main } = createRequire(import.meta.url)(bundle);
const started = Date.now();
const workbook = path.relative(process.cwd(), path.join(root, 'assets', 'demo.xlsx'));
const out = `${path.relative(process.cwd(), path.join(root, 'out', 'demo')) || '.'}${path.sep}`;

const mixgap = async (...args) => {
  const status = await main(['node', 'mixgap', ...args]);
  if (status !== 0) process.exit(status);
};

await mixgap('calc', workbook, '-o', out);
await mixgap('diagram', workbook, '--range', 'Card!A1:B7',
  '--mark', 'grade L=Ageing!B4', '--mark', 'grade H=Ageing!B5',
  '--title', 'Avarite–Bexium (invented alloy for the Mixgap demo)', '-o', out);
// the fitted blend card of the Fit sheet (with its u() and r() rows): the binodal with its band
await mixgap('diagram', workbook, '--range', 'Fit!M3:N26',
  '--title', 'polyvarene–bexylene, fitted to invented cloud points (Mixgap demo)', '-o', path.join(out, 'fit'));
// the three-component card of the Extraction sheet drawn as a composition triangle at 30 °C, with
// the one-stage mixture of the feed and all the solvent marked, and the sheet's counter-current
// cascade (TCASCADE in Extraction!B39: feed 0.85/0.15/0, pure Tessol, 0.6 mol per mole of feed,
// 3 stages) stage by stage
await mixgap('diagram', workbook, '--range', 'Extraction!A4:B12', '--at', '30',
  '--feed', 'feed + solvent=0.09375,0.375',
  '--cascade', 'feed=0.15,0; solvent=0,1; ratio=0.6; stages=3; solute=lumic acid',
  '--title', 'Corvane – lumic acid – Tessol at 30 °C (invented, for the Mixgap demo)', '-o', path.join(out, 'extraction'));

console.log(`
Demo done in ${((Date.now() - started) / 1000).toFixed(1)} s. Invented scenario, invented numbers. Open:
  ${path.join(out, 'demo.computed.xlsx')}   computed workbook (every formula with its value)
  ${path.join(out, 'demo.diagram.png')}     phase diagram (also .svg)
  ${path.join(out, 'fit.png')}             the fitted blend's binodal with its ±2 standard-uncertainty band (also .svg)
  ${path.join(out, 'extraction.png')}      composition triangle of the Extraction sheet's card with its 3-stage cascade (also .svg)`);
