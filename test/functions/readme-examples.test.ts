/**
 * The worked examples in README.md say what the functions return: every self-contained example
 * written as `=MIXGAP.F(...)` → number (no cell references), and every error example written as
 * `=MIXGAP.F(...)` → message, is evaluated through the embedded engine and must show that number
 * to the digits printed, or an error containing that message. This keeps the documentation honest; the numbers
 * themselves are checked against published closed forms elsewhere (test/core, regular-e2e).
 */
import { readFileSync } from 'fs';
import path from 'path';
import { evaluateIn } from './support/evaluate';
import { describe, expect, test } from 'vitest';
import type { ErrorCell } from '../../src/hosts/evaluate';

const root = path.join(__dirname, '..', '..');
const readme = readFileSync(path.join(root, 'README.md'), 'utf8');
const metadata = JSON.parse(readFileSync(path.join(root, 'dist', 'functions.json'), 'utf8'));

/** Examples without cell references (those need a sheet the README only describes). */
const selfContained = (formula: string) => !/(^|[^A-Za-z"])\$?[A-Z]{1,3}\$?\d+(?![\d.(])/.test(formula.replace(/"[^"]*"/g, '""'));

const numeric = [...readme.matchAll(/`(=MIXGAP\.[^`]+)` → (-?\d+(?:\.\d+)?(?:e-?\d+)?)/g)]
  .map((m) => ({ formula: m[1], shown: m[2] }))
  .filter((e) => selfContained(e.formula));
const errors = [...readme.matchAll(/`(=MIXGAP\.[^`]+)` → ([a-zA-Z][^;|\n]*?)(?=\s*(?:;|\||$|\n| \/ ))/gm)]
  .map((m) => ({ formula: m[1], message: m[2].trim() }))
  .filter((e) => selfContained(e.formula) && !/^(model|regular|Redlich)/.test(e.message));

const evaluate = (formulas: string[]) => evaluateIn(metadata, formulas);

describe('README examples', () => {
  test('the README has examples to check', () => {
    expect(numeric.length).toBeGreaterThan(15);
    expect(errors.length).toBeGreaterThan(10);
  });

  test('each number is what the function returns, to the digits shown', () => {
    const got = evaluate(numeric.map((e) => e.formula));
    numeric.forEach((e, i) => {
      const value = got[i];
      expect(typeof value, `${e.formula} gave ${JSON.stringify(value)}`).toBe('number');
      // The README rounds: the value must round to what is shown, i.e. lie within half a unit
      // of its last printed digit (relative, for the 6-significant-digit form).
      const shown = Number(e.shown);
      const digits = e.shown.replace(/^-/, '').replace(/e.*$/, '').replace('.', '').replace(/^0+/, '').length;
      const tolerance = shown === 0 ? 0 : 0.5 * 10 ** (Math.floor(Math.log10(Math.abs(shown))) - digits + 1) * 1.0000001;
      expect(Math.abs((value as number) - shown), `${e.formula}: got ${value}, README shows ${e.shown}`).toBeLessThanOrEqual(tolerance);
    });
  });

  test('each error example gives an error with that message', () => {
    const got = evaluate(errors.map((e) => e.formula));
    errors.forEach((e, i) => {
      const cell = got[i] as ErrorCell;
      expect(cell && typeof cell === 'object' && 'error' in cell, `${e.formula} gave ${JSON.stringify(cell)}`).toBe(true);
      expect(cell.message.includes(e.message.replace(/ \.\.\.$/, '')), `${e.formula}: "${cell.message}" should contain "${e.message}"`).toBe(true);
    });
  });
});
