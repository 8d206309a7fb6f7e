/**
 * The README's FITMODEL worked example (invented cloud points of an invented blend): the start card
 * and the data are read from the README's tables, and every number the README prints for the
 * fitted card, the summary, the residuals, TCRIT and XCRIT must be what the functions return, to
 * the digits printed. XCRIT is also checked against its closed form.
 */
import { readFileSync } from 'fs';
import path from 'path';
import { describe, expect, it } from 'vitest';
import { fitModel, fitResid, fitSummary, gapLow, tCrit, uncertainty, xCrit } from '../../src/functions/index';

const readme = readFileSync(path.join(__dirname, '..', '..', 'README.md'), 'utf8');
const section = readme.slice(readme.indexOf('#### Worked example: cloud points of a blend'), readme.indexOf('#### Fitting functions (general)'));

/** The rows `| n | a | b | ... |` of the table whose header line starts with `head`, as cells (numbers where they are). */
function table(head: string): unknown[][] {
  const lines = section.split('\n');
  const start = lines.findIndex((l) => l.startsWith(head));
  const rows: unknown[][] = [];
  for (const line of lines.slice(start + 2)) {
    if (!line.startsWith('|')) break;
    const cells = line.split('|').slice(2, -1).map((c) => c.trim());
    rows.push(cells.map((c) => (c === '' ? null : /^-?[\d.]+$/.test(c) ? Number(c) : c)));
  }
  return rows;
}

/** Within half a unit of the last digit printed. */
function shows(value: number, printed: string) {
  const decimals = (printed.split('.')[1] ?? '').length;
  const digits = printed.replace(/^-/, '').replace('.', '').replace(/^0+/, '').length;
  const half = decimals > 0 ? 0.5 * 10 ** -decimals : 0.5 * 10 ** (Math.floor(Math.log10(Math.abs(Number(printed)))) - digits + 1);
  expect(Math.abs(value - Number(printed)), `${value} printed as ${printed}`).toBeLessThanOrEqual(half * 1.0000001);
}

describe('README: cloud points of a blend -> chi(T)', () => {
  const start = table('| | A | B | C |');
  const data = table('| | E: kind');
  it('the tables are there', () => {
    expect(start).toHaveLength(8);
    expect(data).toHaveLength(8);
    expect(data[1]).toEqual(['cloud point', 79, 0.15, null, 0.5]);
  });

  it('the fitted card, to the digits printed', () => {
    const card = fitModel(start, data) as unknown[][];
    const printed = [...section.matchAll(/^\| (\S[^|]*?) \| (\S[^|]*?) \|$/gm)].map((m) => [m[1], m[2]]).filter(([k]) => k !== 'key' && !/^-+$/.test(k));
    expect(printed.map(([k]) => k)).toEqual(card.map((r) => r[0]));
    printed.forEach(([key, shown], i) => {
      const v = card[i][1];
      if (typeof v === 'number') shows(v, shown);
      else expect(v, key).toBe(shown);
    });
  });

  it('the summary line and the residuals', () => {
    const line = /`=MIXGAP\.FITSUMMARY\(A1:C8, E1:I8\)` → `([^`]+)`/.exec(section)![1].replace(/\s+/g, ' ');
    expect(fitSummary(start, data)).toBe(line);
    const resid = fitResid(start, data) as unknown[][];
    const shown = /cloud point minus the measured one for each row \(empty for the title row\): ([-\d., ]+) °C/.exec(section.replace(/\s+/g, ' '))![1].split(', ');
    expect(resid[0]).toEqual(['', '']);
    shown.forEach((s, i) => shows(resid[i + 1][0] as number, s));
  });

  it('TCRIT and XCRIT of the fitted card', () => {
    // the fitted card as spilled, u() and r() rows included
    const card = fitModel(start, data) as any[][];
    shows(tCrit(card), /`=MIXGAP\.TCRIT\(M1:N24\)` → ([\d.]+) °C/.exec(section)![1]);
    const x = /`=MIXGAP\.XCRIT\(M1:N24\)` → ([\d.]+)/.exec(section)![1];
    shows(xCrit(card), x);
    // Flory, Principles of Polymer Chemistry (1953), ch. XIII: phi_c = 1/(1 + sqrt(NB/NA)) (volume
    // fraction of B); the critical search is good to ~1e-10 in composition
    expect(Math.abs(xCrit(card) - 1 / (1 + Math.sqrt(60 / 100)))).toBeLessThan(1e-9);
  });

  it('the uncertainties of Tc and of a boundary from the fitted card', () => {
    const card = fitModel(start, data) as any[][];
    const text = section.replace(/\s+/g, ' ');
    shows(uncertainty('TCRIT', card), /`=MIXGAP\.UNCERTAINTY\("TCRIT", M1:N24\)` → ([\d.]+) °C/.exec(text)![1]);
    const [, Tc, band] = /Tc = ([\d.]+) ± ([\d.]+) °C at k = 2/.exec(text)!;
    shows(tCrit(card), Tc);
    shows(2 * uncertainty('TCRIT', card), band);
    shows(uncertainty('GAPLOW', 120 as any, card), /`=MIXGAP\.UNCERTAINTY\("GAPLOW", 120, M1:N24\)` → ([\d.]+)/.exec(text)![1]);
    shows(gapLow(120, card), /beside GAPLOW's (\d\.\d+)/.exec(text)![1]);
  });
});
