/**
 * CSV cards for `mixgap diagram`: the plain layout, and a card saved with semicolons (what a
 * spreadsheet set to a language with decimal commas writes), which must be refused saying so.
 */
import { describe, expect, it } from 'vitest';
import { parseCardCsv } from '../../src/hosts/card-source';

describe('CSV cards', () => {
  it('key,value rows, a title row and comments', () => {
    expect(parseCardCsv('key,value\nmodel,regular\n# note\nomega,21000\n')).toEqual([['model', 'regular'], ['omega', 21000]]);
  });

  it('a semicolon-separated card says its separator is ";" and how to fix it', () => {
    for (const text of ['key;value\nmodel;regular\nomega;21000\n', 'model;regular\nomega;21,5\nenergy;kJ/mol\n']) {
      expect(() => parseCardCsv(text)).toThrow(/separates its cells with ";".*save it as CSV with commas/);
    }
  });

  it('a ";" inside one value of a comma card is not taken for the separator', () => {
    expect(parseCardCsv('model,regular\nomega,21000\nname A,"x;y"\n')).toEqual([['model', 'regular'], ['omega', 21000], ['name A', 'x;y']]);
  });
});
