/**
 * The README's "Extraction cascades" subsection: TCASCADE, TSTAGETABLE, TRECOVERY and TSTAGES are documented
 * there, and each number or table shown after a formula is what the embedded engine gives, to the
 * digits printed (as test/functions/ternary-readme.test.ts does for the whole section). The
 * numbers themselves are checked against outside sources in test/core/ternary/extraction.test.ts.
 */
import { readFileSync } from 'fs';
import path from 'path';
import { describe, expect, it } from 'vitest';
import { evaluateIn } from './support/evaluate';
import { agrees } from './support/digits';

const root = path.join(__dirname, '..', '..');
const readme = readFileSync(path.join(root, 'README.md'), 'utf8');
const start = readme.indexOf('### Extraction cascades');
const section = readme.slice(start, readme.indexOf('\n## ', start));
const metadata = JSON.parse(readFileSync(path.join(root, 'dist', 'functions.json'), 'utf8'));

describe('README: extraction cascades', () => {
  it('documents TCASCADE, TSTAGETABLE, TRECOVERY and TSTAGES', () => {
    expect(start).toBeGreaterThan(0);
    for (const id of ['TCASCADE', 'TSTAGETABLE', 'TRECOVERY', 'TSTAGES']) {
      expect(metadata.functions.map((f: { id: string }) => f.id)).toContain(id);
      expect(section, id).toContain(`**\`${id}(`);
    }
  });

  it('each number and table shown after a formula is what the function returns', () => {
    const numeric = [...section.matchAll(/`(=MIXGAP\.[^`]+)` → (-?\d+(?:\.\d+)?(?:e-?\d+)?)/g)].map((m) => ({ formula: m[1], shown: m[2] }));
    const tables = [...section.matchAll(/`(=MIXGAP\.[^`]+)` →\n\n((?:\|.*\|\n)+)/g)].map((m) => ({
      formula: m[1],
      rows: m[2].trim().split('\n').slice(2).map((l) => l.slice(1, -1).split('|').map((c) => c.trim())),
    }));
    expect(numeric.length).toBeGreaterThanOrEqual(3);
    expect(tables.length).toBeGreaterThanOrEqual(2);
    const got = evaluateIn(metadata, [...numeric.map((e) => e.formula), ...tables.map((t) => t.formula)]);
    numeric.forEach((e, i) => expect(agrees(got[i], e.shown), `${e.formula}: got ${JSON.stringify(got[i])}, README shows ${e.shown}`).toBe(true));
    tables.forEach((t, k) => {
      const table = got[numeric.length + k] as unknown[][];
      expect(Array.isArray(table), t.formula).toBe(true);
      expect(table).toHaveLength(t.rows.length);
      t.rows.forEach((row, r) => row.forEach((cell, c) => {
        if (cell === '') expect(table[r][c]).toBe('');
        else expect(agrees(table[r][c], cell), `${t.formula} [${r}][${c}]: got ${table[r][c]}, README shows ${cell}`).toBe(true);
      }));
    });
  });

  it('the errors shown are what the functions say', () => {
    const errors = [...section.matchAll(/`(=MIXGAP\.[^`]+)` → ([a-z][^;\n]*)/g)].map((m) => ({ formula: m[1], text: m[2] }));
    expect(errors.length).toBeGreaterThanOrEqual(2);
    const got = evaluateIn(metadata, errors.map((e) => e.formula)) as Array<{ error?: string; message?: string }>;
    errors.forEach((e, i) => {
      expect(got[i].error, e.formula).toBeDefined();
      // " ..." ends a quoted opening of the message (as in readme-examples.test.ts)
      const words = e.text.replace(/ \.\.\.$/, '');
      expect(got[i].message, e.formula).toContain(words);
    });
  });
});
