/**
 * Card rough edges a new user hit (issue "what a new user tripped over", item 5): a `key | value`
 * title row, numbers stored as text, a card laid out in two rows, and text given as params. Each
 * other layout must give exactly the answers of the plain two-column card (same parameters, same
 * solve: bit-exact), and the plain card is pinned to the regular solution's closed form.
 */
import { describe, expect, it } from 'vitest';
import { checkCard, gapLow, tCrit } from '../../src/functions/functions';
import { failure } from './support/failure';

/** R from the spec (CODATA 2018, exact by the 2019 SI definitions). */
const R = 8.314462618;

const plain = [['model', 'regular'], ['omega', 21], ['energy', 'kJ/mol'], ['name B', 'bexium']];

describe('the plain card', () => {
  it('is the regular solution: Tc = Omega / 2R', () => {
    // Porter, Easterling & Sherif, Phase Transformations in Metals and Alloys, 3rd ed. (2009), ch. 1: Tc = Omega/2R
    // critical points are resolved to ~1e-13 (test/core/critical.test.ts): 1e-9 allows for conditioning
    expect(Math.abs(tCrit(plain as any) - 21000 / (2 * R))).toBeLessThan(1e-9 * 1263);
  });
});

describe('other layouts read as the plain card', () => {
  const same = (card: unknown[][]) => {
    expect(tCrit(card as any)).toBe(tCrit(plain as any));
    expect(gapLow(900, card as any)).toBe(gapLow(900, plain as any));
    expect(checkCard(card as any)).toBe(checkCard(plain as any));
  };

  it('a key | value title row is skipped (any case)', () => {
    same([['key', 'value'], ...plain]);
    same([[' Key ', 'VALUE'], [null, null], ...plain]);
  });

  it('a number stored as text is the number', () => {
    same([['model', 'regular'], ['omega', '21'], ['energy', 'kJ/mol'], ['name B', 'bexium']]);
    same([['model', 'regular'], ['omega', ' 2.1e1 '], ['energy', 'kJ/mol'], ['name B', 'bexium']]);
    // text that is not a number is still refused, naming the key
    const e = failure(() => tCrit([['model', 'regular'], ['omega', '21 kJ']] as any));
    expect(e.code).toBe('#VALUE!');
    expect(e.message).toContain('"omega" must be a number');
  });

  it('a card in two rows: keys in the first, values in the second', () => {
    same([['model', 'omega', 'energy', 'name B'], ['regular', 21, 'kJ/mol', 'bexium']]);
    // with a title column, and with the values stored as text
    same([['key', 'model', 'omega', 'energy', 'name B'], ['value', 'regular', '21', 'kJ/mol', 'bexium']]);
    // a missing value in a two-row card names its key
    const e = failure(() => tCrit([['model', 'omega', 'energy'], ['regular', null, 'kJ/mol']] as any));
    expect(e.code).toBe('#VALUE!');
    expect(e.message).toContain('"omega" has no value');
  });

  it('a two-column card of two rows is still read as columns', () => {
    expect(tCrit([['model', 'regular'], ['omega', 21000]] as any)).toBe(tCrit(21000 as any));
  });
});

describe('text given as params says so, and what to give instead', () => {
  for (const params of ['21000', ' 21000 ', 'regular', [['21000']], [['omega'], ['21000']]]) {
    it(JSON.stringify(params), () => {
      const e = failure(() => gapLow(800, params as any));
      expect(e.code).toBe('#VALUE!');
      expect(e.message).toContain('params is text');
      expect(e.message).toContain('give Omega as a number');
      expect(e.message).toContain('parameter card');
    });
  }

  it('a number stored as text is named as such', () => {
    expect(failure(() => gapLow(800, '21000' as any)).message).toContain('a number stored as text');
  });

  it('Redlich–Kister rows stored as text are named as numbers stored as text', () => {
    const e = failure(() => gapLow(800, [['21000', '-2'], ['3000', null]] as any));
    expect(e.code).toBe('#VALUE!');
    expect(e.message).toContain('numbers stored as text ("21000")');
  });
});
