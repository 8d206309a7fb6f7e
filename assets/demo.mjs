// `npm run demo`: computes the demo workbook (assets/demo.xlsx, an invented scenario) with
// `mixgap calc` and draws its phase diagram with `mixgap diagram`, both into out/demo/, and the
// composition triangle of a three-component card (assets/extraction-card.csv, invented).
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
// a three-component card (invented extraction scenario) drawn as a composition triangle at 25 °C
const extraction = path.relative(process.cwd(), path.join(root, 'assets', 'extraction-card.csv'));
await mixgap('diagram', extraction, '--at', '25', '--feed', 'feed=0.4,0.1',
  '--title', 'water – tarnol – quellic acid at 25 °C (invented, for the Mixgap demo)', '-o', out);

console.log(`
Demo done in ${((Date.now() - started) / 1000).toFixed(1)} s. Invented scenario, invented numbers. Open:
  ${path.join(out, 'demo.computed.xlsx')}   computed workbook (every formula with its value)
  ${path.join(out, 'demo.diagram.png')}     phase diagram (also .svg)
  ${path.join(out, 'extraction-card.diagram.png')}   composition triangle of the extraction card (also .svg)`);
