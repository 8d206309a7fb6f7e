// Writes assets/demo.xlsx, the demo workbook (`npm run make-demo`; commit the result).
//
// The scenario is invented from start to end: an imaginary alloy of two imaginary metals,
// Avarite (A) and Bexium (B), aged to precipitate a Bexium-rich phase, with made-up parameters,
// prices and specification. None of the numbers describes a real material or process.
import path from 'path';
import { fileURLToPath } from 'url';
import ExcelJS from 'exceljs';

const here = path.dirname(fileURLToPath(import.meta.url));
const target = path.join(here, 'demo.xlsx');

const wb = new ExcelJS.Workbook();
wb.creator = 'Mixgap demo';
// Fixed dates keep the file the same from run to run.
wb.created = new Date(Date.UTC(2025, 0, 1));
wb.modified = new Date(Date.UTC(2025, 0, 1));

const bold = { bold: true };
const header = (row) => {
  row.font = bold;
  row.alignment = { wrapText: true, vertical: 'top' };
};
const CARD = 'Card!$A$1:$B$7';

// --- About -------------------------------------------------------------------------------------
const about = wb.addWorksheet('About');
about.getColumn(1).width = 110;
[
  ['Mixgap demo workbook: ageing an invented alloy', bold],
  ['Everything here is invented for the demo: the metals Avarite (A) and Bexium (B), their solution parameters, the prices and the specification.'],
  ['No number in this workbook describes a real material, furnace or part.'],
  [''],
  ['Card: the parameter card (two columns, key | value) every formula reads, as the range Card!$A$1:$B$7.'],
  ['Grid: binodal and spinodal compositions on a temperature grid (GAPLOW, GAPHIGH, SPINLOW, SPINHIGH, GAPCOUNT), critical point (TCRIT, XCRIT, CRITKIND).'],
  ['     Above the critical temperature there is no gap: those cells show #N/A on purpose.'],
  ['Table: one GAPTABLE formula that spills a 61-row table (T, binodal low/high, spinodal low/high).'],
  ['Ageing: two grades aged at candidate temperatures: precipitate fraction (PHASEFRAC, lever rule), ageing time, furnace cost per part, cheapest temperature that meets the specification.'],
  [''],
  ['Compute it without a spreadsheet program:  npx mixgap calc assets/demo.xlsx -o out/demo/'],
  ['Open it in Excel with the Mixgap add-in loaded and the same formulas recalculate there.'],
  [''],
  ['Caution', bold],
  ['Equilibrium phase fractions from a solution model are an estimate, not a heat-treatment procedure. Real ageing depends on kinetics, section size,'],
  ['furnace uniformity and the actual material. Heat-treatment schedules for parts are set and verified under the applicable codes, standards and'],
  ['qualified, licensed practice where you work; measure the parts.'],
].forEach(([text, font], i) => {
  const c = about.getCell(i + 1, 1);
  c.value = text;
  if (font) c.font = font;
});

// --- Card --------------------------------------------------------------------------------------
const card = wb.addWorksheet('Card');
card.getColumn(1).width = 14;
card.getColumn(2).width = 14;
card.getColumn(4).width = 70;
const cardRows = [
  ['model', 'redlich-kister', 'Redlich–Kister description of the Gibbs energy of mixing'],
  ['L0', 18, 'L0 (kJ/mol, invented)'],
  ['L1', 2.2, 'L1 (kJ/mol, invented): makes the gap lean towards Avarite'],
  ['energy', 'kJ/mol', 'unit of L0 and L1'],
  ['temperature', '°C', 'unit of every temperature the functions read and return'],
  ['name A', 'Avarite', 'component A (invented metal)'],
  ['name B', 'Bexium', 'component B (invented metal); compositions are mole fractions of Bexium'],
];
cardRows.forEach(([key, value, note], i) => {
  card.getCell(i + 1, 1).value = key;
  card.getCell(i + 1, 2).value = value;
  card.getCell(i + 1, 4).value = note;
});
card.getCell('A9').value = 'What the functions read from the card (CHECKCARD):';
card.getCell('A9').font = bold;
card.getCell('A10').value = { formula: `MIXGAP.CHECKCARD(${CARD})` };

// --- Grid --------------------------------------------------------------------------------------
const grid = wb.addWorksheet('Grid');
grid.columns = [
  { header: 'T (°C)', width: 9 },
  { header: 'binodal low (x B)', width: 12, style: { numFmt: '0.0000' } },
  { header: 'binodal high (x B)', width: 12, style: { numFmt: '0.0000' } },
  { header: 'spinodal low (x B)', width: 12, style: { numFmt: '0.0000' } },
  { header: 'spinodal high (x B)', width: 12, style: { numFmt: '0.0000' } },
  { header: 'gaps', width: 6 },
  { header: '', width: 3 },
  { header: 'critical point', width: 20 },
  { header: '', width: 12 },
];
header(grid.getRow(1));
const first = 300, step = 25, count = 25; // 300 to 900 °C
for (let i = 0; i < count; i++) {
  const r = i + 2;
  grid.getCell(r, 1).value = i === 0 ? first : { formula: `A${r - 1}+${step}` };
  grid.getCell(r, 2).value = { formula: `MIXGAP.GAPLOW(A${r}, ${CARD})` };
  grid.getCell(r, 3).value = { formula: `MIXGAP.GAPHIGH(A${r}, ${CARD})` };
  grid.getCell(r, 4).value = { formula: `MIXGAP.SPINLOW(A${r}, ${CARD})` };
  grid.getCell(r, 5).value = { formula: `MIXGAP.SPINHIGH(A${r}, ${CARD})` };
  grid.getCell(r, 6).value = { formula: `MIXGAP.GAPCOUNT(A${r}, ${CARD})` };
}
grid.getCell('H2').value = 'temperature (°C)';
grid.getCell('I2').value = { formula: `MIXGAP.TCRIT(${CARD})` };
grid.getCell('I2').numFmt = '0.0';
grid.getCell('H3').value = 'composition (x B)';
grid.getCell('I3').value = { formula: `MIXGAP.XCRIT(${CARD})` };
grid.getCell('I3').numFmt = '0.0000';
grid.getCell('H4').value = 'kind';
grid.getCell('I4').value = { formula: `MIXGAP.CRITKIND(${CARD})` };
grid.views = [{ state: 'frozen', ySplit: 1 }];

// --- Table -------------------------------------------------------------------------------------
const table = wb.addWorksheet('Table');
table.columns = ['T (°C)', 'binodal low', 'binodal high', 'spinodal low', 'spinodal high'].map((h, i) => ({
  header: h, width: 13, style: i ? { numFmt: '0.0000' } : { numFmt: '0.0' },
}));
header(table.getRow(1));
// The number of rows (61) is written in the formula: the engine sizes a spilled table from the formula text.
table.getCell('A2').value = { formula: `MIXGAP.GAPTABLE(300, 900, 61, ${CARD})` };
table.getCell('G1').value = 'One formula in A2 fills A2:E62. #N/A: no gap at that temperature.';

// --- Ageing ------------------------------------------------------------------------------------
const ageing = wb.addWorksheet('Ageing');
ageing.getColumn(1).width = 44;
for (const c of [2, 3, 4, 5, 6, 7]) ageing.getColumn(c).width = 15;
ageing.getCell('A1').value = 'Ageing two grades of the invented Avarite–Bexium alloy (all numbers invented)';
ageing.getCell('A1').font = bold;
const inputs = [
  ['A3', 'grade', 'B3', 'x0 (mole fraction of Bexium)'],
  ['A4', 'grade L', 'B4', 0.12],
  ['A5', 'grade H', 'B5', 0.2],
  ['A6', 'furnace cost per part and hour at 500 °C (€)', 'B6', 0.35],
  ['A7', 'material and handling per part (€)', 'B7', 4.2],
  ['A8', 'specification: precipitate fraction at least', 'B8', 0.05],
];
for (const [a, label, b, value] of inputs) {
  ageing.getCell(a).value = label;
  ageing.getCell(b).value = value;
}
ageing.getRow(3).font = bold;
const first10 = 11;
const temps = [400, 450, 500, 550, 600, 650, 700, 750];
[
  'ageing T (°C)', 'precipitate fraction, grade L', 'precipitate fraction, grade H', 'ageing time (h)',
  'cost per part, grade L (€)', 'grade L meets spec', 'grade H meets spec',
].forEach((h, i) => { ageing.getCell(10, i + 1).value = h; });
header(ageing.getRow(10));
ageing.getCell('A9').value = 'Ageing time: invented rule 40 h × exp(−(T − 400 °C)/90 °C). Furnace cost grows with absolute temperature (invented).';
temps.forEach((T, i) => {
  const r = first10 + i;
  ageing.getCell(r, 1).value = T;
  // PHASEFRAC: lever-rule fraction of the Bexium-rich ("high") phase, i.e. the precipitate.
  ageing.getCell(r, 2).value = { formula: `MIXGAP.PHASEFRAC($B$4, A${r}, ${CARD}, "high")` };
  ageing.getCell(r, 3).value = { formula: `MIXGAP.PHASEFRAC($B$5, A${r}, ${CARD}, "high")` };
  ageing.getCell(r, 4).value = { formula: `ROUND(40*EXP(-(A${r}-400)/90), 1)` };
  ageing.getCell(r, 5).value = { formula: `$B$7+D${r}*$B$6*(A${r}+273.15)/(500+273.15)` };
  ageing.getCell(r, 6).value = { formula: `IF(B${r}>=$B$8, "yes", "no")` };
  ageing.getCell(r, 7).value = { formula: `IF(C${r}>=$B$8, "yes", "no")` };
  for (const c of [2, 3]) ageing.getCell(r, c).numFmt = '0.0000';
  ageing.getCell(r, 5).numFmt = '0.00';
});
const last = first10 + temps.length - 1;
ageing.getCell('A20').value = 'cheapest cost per part meeting the spec, grade L (€)';
ageing.getCell('B20').value = { formula: `MINIFS(E${first10}:E${last}, F${first10}:F${last}, "yes")` };
ageing.getCell('B20').numFmt = '0.00';
ageing.getCell('A21').value = 'at ageing temperature (°C)';
ageing.getCell('B21').value = { formula: `INDEX(A${first10}:A${last}, MATCH(B20, E${first10}:E${last}, 0))` };
ageing.getCell('A23').value = 'Caution: an equilibrium estimate from invented data, not a heat-treatment procedure; see the About sheet.';
ageing.getCell('A23').font = { italic: true };

// --- Fit (FITMODEL and its siblings) ------------------------------------------------------------
/** Sheet "Fit": invented cloud points of an invented polymer blend -> chi(T) card -> Tc. */
function addFitSheet(workbook) {
  const fit = workbook.addWorksheet('Fit');
  for (const [c, w] of [[1, 16], [2, 14], [3, 8], [5, 13], [6, 9], [7, 9], [8, 4], [9, 8], [10, 12], [11, 4], [13, 16], [14, 14]]) fit.getColumn(c).width = w;
  fit.getCell('A1').value = 'Cloud points of an invented blend (polyvarene + bexylene, all numbers invented) -> chi(T) -> critical temperature';
  fit.getCell('A1').font = bold;
  const start = [
    ['model', 'flory-huggins'], ['NA', 100], ['NB', 60, 'fixed'], ['chi.A', null, 'fit'], ['chi.B', null, 'fit'],
    ['temperature', '°C'], ['name A', 'polyvarene'], ['name B', 'bexylene'],
  ];
  start.forEach((row, i) => row.forEach((v, j) => { if (v !== null) fit.getCell(3 + i, 1 + j).value = v; }));
  const data = [
    ['kind', 'T (°C)', 'phi B', null, 'u (°C)'],
    ...[[79, 0.15], [118.4, 0.25], [143.1, 0.35], [156.1, 0.45], [161.9, 0.55], [158.9, 0.65], [145.3, 0.75]].map(([T, phi]) => ['cloud point', T, phi, null, 0.5]),
  ];
  data.forEach((row, i) => row.forEach((v, j) => { if (v !== null) fit.getCell(3 + i, 5 + j).value = v; }));
  header(fit.getRow(2));
  fit.getCell('A2').value = 'start card (fit = free)';
  fit.getCell('E2').value = 'measurements';
  fit.getCell('J2').value = 'residual (°C)';
  fit.getCell('M2').value = 'fitted card';
  // Spill sizes are written in the formulas (the engine sizes a spill from the formula text).
  fit.getCell('J3').value = { formula: 'MIXGAP.FITRESID($A$3:$C$10, $E$3:$I$10, 8)' };
  fit.getCell('M3').value = { formula: 'MIXGAP.FITMODEL($A$3:$C$10, $E$3:$I$10)' };
  for (let r = 4; r <= 10; r++) fit.getCell(r, 10).numFmt = '0.00';
  fit.getCell('A13').value = 'summary';
  fit.getCell('A13').font = bold;
  fit.getCell('A14').value = { formula: 'MIXGAP.FITSUMMARY($A$3:$C$10, $E$3:$I$10)' };
  fit.getCell('A16').value = 'critical temperature (°C)';
  // The fitted card as spilled in M3:N26, u() and r() rows included, as params.
  fit.getCell('B16').value = { formula: 'MIXGAP.TCRIT($M$3:$N$26)' };
  fit.getCell('B16').numFmt = '0.00';
  fit.getCell('A17').value = 'critical phi of bexylene';
  fit.getCell('B17').value = { formula: 'MIXGAP.XCRIT($M$3:$N$26)' };
  fit.getCell('B17').numFmt = '0.0000';
  fit.getCell('C16').value = '±';
  fit.getCell('D16').value = { formula: '2*MIXGAP.UNCERTAINTY("TCRIT", $M$3:$N$26)' };
  fit.getCell('D16').numFmt = '0.00';
  fit.getCell('E16').value = '°C: twice the standard uncertainty of Tc from the scatter of the cloud points (k = 2)';
  // the binodal with its band for a chart: T, low, low - 2u, low + 2u, high, high - 2u, high + 2u
  fit.getCell('A27').value = 'binodal with its ±2u band (GAPBAND), for an XY chart';
  fit.getCell('A27').font = bold;
  ['T (°C)', 'low', 'low - 2u', 'low + 2u', 'high', 'high - 2u', 'high + 2u'].forEach((h, i) => { fit.getCell(28, 1 + i).value = h; });
  header(fit.getRow(28));
  fit.getCell('A29').value = { formula: 'MIXGAP.GAPBAND(80, 161, 28, $M$3:$N$26)' };
  fit.getCell('A19').value = 'covariance of chi.A, chi.B';
  fit.getCell('A19').font = bold;
  fit.getCell('A20').value = { formula: 'MIXGAP.FITCOV($A$3:$C$10, $E$3:$I$10, , 2)' };
  fit.getCell('A24').value = 'Invented data for the demo: no real polymer is described. The u column is the stated uncertainty of each cloud point.';
  fit.getCell('A24').font = { italic: true };
}


// --- Extraction (three components) -------------------------------------------------------------
// An invented extraction: "lumic acid" (B, the solute) taken out of an invented carrier "Corvane"
// (A) by an invented solvent "Tessol" (C), Redlich–Kister, kJ/mol, °C. Every number is made up.
// The ternary card sits in Extraction!A4:B12 (two columns, key | value), for the triangle picture too.
function addExtractionSheet(workbook) {
  const ws = workbook.addWorksheet('Extraction');
  ws.getColumn(1).width = 30;
  for (const c of [2, 3, 4, 5, 6, 7, 8, 9]) ws.getColumn(c).width = 14;
  const put = (addr, value, fmt) => {
    const c = ws.getCell(addr);
    c.value = typeof value === 'string' && value.startsWith('=') ? { formula: value.slice(1) } : value;
    if (fmt) c.numFmt = fmt;
  };
  const card = 'Extraction!$A$4:$B$12', z = '0.000000', amt = '0.000';
  put('A1', 'Extracting an invented solute, lumic acid, from an invented carrier, Corvane, with an invented solvent, Tessol (all numbers invented)');
  ws.getCell('A1').font = bold;
  put('A2', 'Caution: hot or flammable solvents are designed and run under your local codes, standards and licensed engineering practice; model tie-lines are no substitute for measured ones.');
  ws.getCell('A2').font = { italic: true };
  put('A3', 'ternary card (key | value), read by every formula here');
  ws.getCell('A3').font = bold;
  [
    ['model', 'rk'], ['AB.L0', 3.2], ['AC.L0', 8.8], ['BC.L0', 0.6], ['energy', 'kJ/mol'], ['temperature', '°C'],
    ['name A', 'Corvane'], ['name B', 'lumic acid'], ['name C', 'Tessol'],
  ].forEach(([k, v], i) => { put(`A${4 + i}`, k); put(`B${4 + i}`, v); });
  put('D3', 'inputs'); ws.getCell('D3').font = bold;
  put('D4', 'temperature (°C)'); put('E4', 30);
  put('D5', 'feed (mol)'); put('E5', 100);
  put('D6', 'feed x_A, x_B, x_C'); put('E6', 0.85); put('F6', 0.15); put('G6', 0);
  put('D7', 'solvent x_A, x_B, x_C'); put('E7', 0); put('F7', 0); put('G7', 1);
  put('D8', 'solvent per cross-current stage (mol)'); put('E8', 20);
  put('D9', 'solvent-to-feed ratio (all solvent)'); put('E9', 0.6);
  put('D10', 'target recovery of lumic acid'); put('E10', 0.99);
  put('D11', 'feed and all solvent (mol)'); put('E11', '=E5'); put('F11', '=E5*E9');

  // one stage: all the solvent at once
  put('A14', 'One stage: feed + all the solvent, mixed and split (TSPLIT)'); ws.getCell('A14').font = bold;
  ['mixture (mol)', 'z_B', 'z_C'].forEach((h, i) => put(`${'ABC'[i]}15`, h));
  put('A16', '=E5*(1+E9)', amt); put('B16', '=(E5*F6+E5*E9*F7)/A16', z); put('C16', '=(E5*G6+E5*E9*G7)/A16', z);
  ['x_A', 'x_B', 'x_C', 'fraction'].forEach((h, i) => put(`${'EFGH'[i]}15`, h));
  put('E16', `=MIXGAP.TSPLIT(B16, C16, E4, ${card})`, z);
  put('D16', 'raffinate'); put('D17', 'extract (richer in Tessol)');
  put('A18', 'recovery, one stage'); put('B18', '=A16*H17*F17/(E5*F6)', z);

  // three cross-current stages: the raffinate (phase 1, the Tessol-poor one) meets fresh solvent
  put('A20', 'Three cross-current stages: each raffinate meets fresh solvent (chained TSPLIT cells)'); ws.getCell('A20').font = bold;
  ['raffinate in (mol)', 'x_A', 'x_B', 'x_C', 'solvent (mol)', 'mixture (mol)', 'z_B', 'z_C'].forEach((h, i) => put(`${'ABCDEFGH'[i]}21`, h));
  for (let k = 0; k < 3; k++) {
    const r = 22 + 4 * k;
    if (k === 0) { put(`A${r}`, '=E5', amt); put(`B${r}`, '=E6', z); put(`C${r}`, '=F6', z); put(`D${r}`, '=G6', z); }
    else {
      put(`A${r}`, `=F${r - 4}*D${r - 3}`, amt);
      put(`B${r}`, `=A${r - 3}`, z); put(`C${r}`, `=B${r - 3}`, z); put(`D${r}`, `=C${r - 3}`, z);
    }
    put(`E${r}`, '=$E$8', amt);
    put(`F${r}`, `=A${r}+E${r}`, amt);
    put(`G${r}`, `=(A${r}*C${r}+E${r}*$F$7)/F${r}`, z);
    put(`H${r}`, `=(A${r}*D${r}+E${r}*$G$7)/F${r}`, z);
    put(`A${r + 1}`, `=MIXGAP.TSPLIT(G${r}, H${r}, $E$4, ${card})`, z);
    put(`I${r + 1}`, `stage ${k + 1}: raffinate (x_A, x_B, x_C, fraction)`);
    put(`I${r + 2}`, `stage ${k + 1}: extract`);
  }
  put('A35', 'recovery, three cross-current stages'); put('B35', '=1-F30*D31*B31/(E5*F6)', z);

  // counter-current: TCASCADE, recovery against stage count, TSTAGES
  put('A37', 'Counter-current cascade with the same total solvent (TCASCADE, 3 stages)'); ws.getCell('A37').font = bold;
  ['x_A', 'x_B', 'x_C', 'amount (mol)', 'share of lumic acid'].forEach((h, i) => put(`${'BCDEF'[i]}38`, h));
  put('A39', 'final raffinate'); put('A40', 'final extract (its share: the recovery)');
  put('B39', `=MIXGAP.TCASCADE(E6:G6, E7:G7, E11:F11, 3, "lumic acid", E4, ${card})`, z);
  put('A42', 'stages'); put('B42', 'recovery (TRECOVERY)'); ws.getRow(42).font = bold;
  for (let N = 1; N <= 8; N++) {
    put(`A${42 + N}`, N);
    put(`B${42 + N}`, `=MIXGAP.TRECOVERY($E$6:$G$6, $E$7:$G$7, $E$9, A${42 + N}, "lumic acid", $E$4, ${card})`, z);
  }
  put('A52', 'stages for the target recovery (TSTAGES)'); put('B52', `=MIXGAP.TSTAGES(E10, E6:G6, E7:G7, E9, "lumic acid", E4, ${card})`, '0.00');
}

// The Extraction sheet's counter-current cascade stage by stage (TSTAGETABLE), below its TSTAGES
// row: the numbers the demo's triangle picture draws (`mixgap diagram ... --cascade`).
function addStageTable(workbook) {
  const ws = workbook.getWorksheet('Extraction');
  const put = (addr, value, fmt) => {
    const c = ws.getCell(addr);
    c.value = typeof value === 'string' && value.startsWith('=') ? { formula: value.slice(1) } : value;
    if (fmt) c.numFmt = fmt;
  };
  put('A54', 'The same cascade stage by stage (TSTAGETABLE): the streams leaving each stage'); ws.getCell('A54').font = bold;
  ['raffinate x_A', 'x_B', 'x_C', 'amount (mol)', 'extract x_A', 'x_B', 'x_C', 'amount (mol)'].forEach((h, i) => put(`${'BCDEFGHI'[i]}55`, h));
  ws.getRow(55).font = bold;
  for (let k = 1; k <= 3; k++) put(`A${55 + k}`, `stage ${k}`);
  // the stage count is written as a number: the formula engine sizes the spill from it
  put('B56', '=MIXGAP.TSTAGETABLE(E6:G6, E7:G7, E11:F11, 3, "lumic acid", E4, Extraction!$A$4:$B$12)', '0.000000');
}

addFitSheet(wb);
uncertaintySheet(wb);
addExtractionSheet(wb);
addStageTable(wb);

await wb.xlsx.writeFile(target);
console.log(`wrote ${path.relative(process.cwd(), target)}`);

// --- Uncertainty (UNCERTAINTY, GAPBAND) -------------------------------------------------------
/** The demo card with invented standard uncertainties of L0 and L1, and what they make of the gap. */
function uncertaintySheet(book) {
  const sheet = book.addWorksheet('Uncertainty');
  sheet.getColumn(1).width = 12;
  sheet.getColumn(2).width = 14;
  for (const c of [4, 5, 6, 7, 8, 9, 10]) sheet.getColumn(c).width = 15;
  sheet.getCell('A1').value = 'The demo card with invented standard uncertainties u() and a correlation r(): how far the gap may be off';
  sheet.getCell('A1').font = bold;
  const rows = [
    ['model', 'redlich-kister'], ['L0', 18], ['L1', 2.2], ['energy', 'kJ/mol'], ['temperature', '°C'],
    ['name A', 'Avarite'], ['name B', 'Bexium'], ['u(L0)', 0.2], ['u(L1)', 0.15], ['r(L0, L1)', -0.5],
  ];
  rows.forEach(([key, value], i) => {
    sheet.getCell(3 + i, 1).value = key;
    sheet.getCell(3 + i, 2).value = value;
  });
  const ucard = 'Uncertainty!$A$3:$B$12';
  sheet.getCell('D3').value = 'TCRIT (°C)';
  sheet.getCell('E3').value = { formula: `MIXGAP.TCRIT(${ucard})` };
  sheet.getCell('D4').value = 'u(TCRIT) (°C)';
  sheet.getCell('E4').value = { formula: `MIXGAP.UNCERTAINTY("TCRIT", ${ucard})` };
  for (const c of ['E3', 'E4']) sheet.getCell(c).numFmt = '0.0';
  ['T (°C)', 'GAPLOW', 'u(GAPLOW)', 'GAPHIGH', 'u(GAPHIGH)'].forEach((h, i) => { sheet.getCell(14, 4 + i).value = h; });
  header(sheet.getRow(14));
  [400, 500, 600, 700, 750, 800, 840].forEach((T, i) => {
    const r = 15 + i;
    sheet.getCell(r, 4).value = T;
    sheet.getCell(r, 5).value = { formula: `MIXGAP.GAPLOW(D${r}, ${ucard})` };
    sheet.getCell(r, 6).value = { formula: `MIXGAP.UNCERTAINTY("GAPLOW", D${r}, ${ucard})` };
    sheet.getCell(r, 7).value = { formula: `MIXGAP.GAPHIGH(D${r}, ${ucard})` };
    sheet.getCell(r, 8).value = { formula: `MIXGAP.UNCERTAINTY("GAPHIGH", D${r}, ${ucard})` };
    for (const c of [5, 6, 7, 8]) sheet.getCell(r, c).numFmt = '0.0000';
  });
  sheet.getCell('D22').value = 'Near the critical point the uncertainty is #N/A on purpose: the gap may close within 2 standard uncertainties, and linear propagation would give a misleading number.';
  ['T (°C)', 'low', 'low - 2u', 'low + 2u', 'high', 'high - 2u', 'high + 2u'].forEach((h, i) => { sheet.getCell(24, 4 + i).value = h; });
  header(sheet.getRow(24));
  // One GAPBAND formula fills D25:J55 (31 rows written in the formula, as for GAPTABLE).
  sheet.getCell('D25').value = { formula: `MIXGAP.GAPBAND(300, 900, 31, ${ucard})` };
  sheet.getCell('A14').value = 'Caution: the band covers the scatter of the parameters only; see the About sheet.';
  sheet.getCell('A14').font = { italic: true };
}
