/**
 * The README's "Three components" section says what the ternary functions return: its card table
 * is the ternary registry, every ternary function is documented there, and every example (a
 * number after `=MIXGAP.T...(...)` →, or a spilled table below one) is what the embedded engine
 * gives, to the digits printed. The numbers themselves are checked against outside sources in
 * ternary.test.ts; this keeps the documentation honest.
 */
import { readFileSync } from 'fs';
import path from 'path';
import { evaluateIn } from './support/evaluate';
import { describe, expect, it } from 'vitest';
import { TERNARY_FAMILIES } from '../../src/core/ternary/families';
import { agrees } from './support/digits';

const root = path.join(__dirname, '..', '..');
const readme = readFileSync(path.join(root, 'README.md'), 'utf8');
const start = readme.indexOf('## Three components');
const section = readme.slice(start, readme.indexOf('\n## ', start + 5));
const metadata = JSON.parse(readFileSync(path.join(root, 'dist', 'functions.json'), 'utf8'));

const evaluate = (formulas: string[]) => evaluateIn(metadata, formulas);

describe('README: three components', () => {
  it('has the section', () => expect(start).toBeGreaterThan(0));

  it('its card table lists exactly the ternary registry rows', () => {
    const table = section.slice(section.indexOf('### Ternary parameter cards'));
    const lines = table.split('\n').filter((l) => l.startsWith('| ')).slice(1); // after the header
    const rows = lines.map((l) => l.split(' | ').map((c) => c.replace(/^\| /, '').replace(/ \|$/, '')));
    const keys = (ks: readonly string[]) => ks.map((k) => (k === '...' ? '...' : `\`${k}\``)).join(', ');
    const want = TERNARY_FAMILIES.flatMap((f) => f.keyRows.map((r) => [keys(r.keys), f.name, r.meaning]));
    for (const w of want) expect(rows, w.join(' | ')).toContainEqual(w);
    const familyRows = rows.filter((r) => TERNARY_FAMILIES.some((f) => f.name === r[1]));
    expect(familyRows).toHaveLength(want.length);
  });

  it('documents every ternary function', () => {
    const ternary = (metadata.functions as Array<{ id: string }>).map((f) => f.id).filter((id) => /^T(PHASES|SPLIT|DIST|SELECT|PLAIT|TRIANGLE|ACTIVITY|CHEMPOT|GMIX|BINODAL)$/.test(id));
    expect(ternary).toHaveLength(10);
    for (const id of ternary) expect(section, id).toContain(`**\`${id}(`);
  });

  it('each number shown after a formula is what the function returns', () => {
    const numeric = [...section.matchAll(/`(=MIXGAP\.[^`]+)` → (-?\d+(?:\.\d+)?(?:e-?\d+)?)/g)].map((m) => ({ formula: m[1], shown: m[2] }));
    expect(numeric.length).toBeGreaterThanOrEqual(11);
    const got = evaluate(numeric.map((e) => e.formula));
    numeric.forEach((e, i) => expect(agrees(got[i], e.shown), `${e.formula}: got ${JSON.stringify(got[i])}, README shows ${e.shown}`).toBe(true));
  });

  it('each spilled table shown below a formula is what the function returns', () => {
    const tables = [...section.matchAll(/`(=MIXGAP\.[^`]+)` →\n\n((?:\|.*\|\n)+)/g)].map((m) => ({
      formula: m[1],
      rows: m[2].trim().split('\n').slice(2).map((l) => l.slice(1, -1).split('|').map((c) => c.trim())),
    }));
    expect(tables.length).toBeGreaterThanOrEqual(6);
    const got = evaluate(tables.map((t) => t.formula)) as unknown[][][];
    tables.forEach((t, i) => {
      expect(Array.isArray(got[i]), `${t.formula} gave ${JSON.stringify(got[i])}`).toBe(true);
      expect(got[i]).toHaveLength(t.rows.length);
      t.rows.forEach((row, r) => row.forEach((cell, c) => {
        const value = got[i][r][c];
        if (cell === '') expect(value, `${t.formula} [${r}][${c}]`).toBe('');
        else expect(agrees(value, cell), `${t.formula} [${r}][${c}]: got ${value}, README shows ${cell}`).toBe(true);
      }));
    });
  });
});
