/**
 * UNCERTAINTY gives the same bits whatever was computed before it: each formula evaluated in a
 * fresh state (solve memory emptied) against the same formulas in shuffled orders (named seeds),
 * with the memory kept between them, warm-ups of the card's own cells at nearby temperatures and
 * the other UNCERTAINTY cells in between (so that the moved models' solves start from their
 * parent's map at the same temperature, from their own last map or from nothing). The moved
 * models only change where a solve starts; every gap ends in the same final solve.
 */
import { describe, expect, it } from 'vitest';
import { forgetSolves } from '../../src/core/equilibrium';
import { gapHigh, gapLow, spinLow } from '../../src/functions/functions';
import { gapBand, uncertainty } from '../../src/functions/uncertainty';
import { generator } from './support/random';

type Card = any[][];
const U = uncertainty as (name: string, ...args: unknown[]) => number;

// Invented cards with uncertainties, one per family (test inputs only).
const RK: Card = [['model', 'rk'], ['L0', 20000], ['L0.b', -2], ['L1', 3000], ['u(L0)', 150], ['u(L0.b)', 0.1], ['u(L1)', 120], ['r(L0, L0.b)', 0.3], ['r(L0, L1)', -0.6]];
const REGULAR: Card = [['model', 'regular'], ['omega', 21], ['energy', 'kJ/mol'], ['u(omega)', 0.2]];
const BLEND: Card = [['model', 'flory-huggins'], ['NA', 1200], ['NB', 900], ['chi.A', -0.0011], ['chi.B', 1.32], ['u(chi.A)', 0.00002], ['u(chi.B)', 0.005], ['r(chi.A, chi.B)', -0.9]];
const DECANTER: Card = [['model', 'nrtl'], ['a12', -1.2], ['b12', 1150], ['a21', 0.8], ['b21', 520], ['alpha', 0.25], ['u(b12)', 15], ['u(b21)', 10]];

type Formula = { text: string; call: () => unknown; card: Card; T: number };
const formulas: Formula[] = [];
const add = (text: string, card: Card, T: number, call: () => unknown) => formulas.push({ text, call, card, T });
for (const T of [600, 640, 700, 760, 820, 1150, 1180]) {
  add(`GAPLOW ${T} RK`, RK, T, () => U('GAPLOW', T, RK));
  add(`GAPHIGH ${T} RK`, RK, T, () => U('GAPHIGH', T, RK));
  add(`SPINLOW ${T} RK`, RK, T, () => U('SPINLOW', T, RK));
}
for (const T of [800, 1000, 1200, 1250]) add(`GAPLOW ${T} regular`, REGULAR, T, () => U('GAPLOW', T, REGULAR));
for (const T of [250, 300, 330, 430]) add(`GAPHIGH ${T} blend`, BLEND, T, () => U('GAPHIGH', T, BLEND));
for (const T of [300, 320]) add(`GAPLOW ${T} decanter`, DECANTER, T, () => U('GAPLOW', T, DECANTER));
add('PHASEFRAC 0.3 700 RK', RK, 700, () => U('PHASEFRAC', 0.3, 700, RK));
add('TCRIT RK', RK, 1000, () => U('TCRIT', RK));
add('GAPBAND 600..900 RK', RK, 750, () => gapBand(600, 900, 4, RK));

/** What a formula shows: its number or table, or its error code and message. */
function shown(f: Formula): unknown {
  try {
    return f.call();
  } catch (e) {
    return `error ${(e as { code?: string }).code}: ${(e as { message?: string }).message}`;
  }
}

describe('UNCERTAINTY does not depend on what was computed before', () => {
  const fresh = new Map<string, string>();
  it('the formulas give numbers (most of them) and a refusal or two: the test has something to compare', () => {
    for (const f of formulas) {
      forgetSolves();
      fresh.set(f.text, JSON.stringify(shown(f)));
    }
    const numbers = [...fresh.values()].filter((v) => !v.startsWith('"error'));
    expect(numbers.length).toBeGreaterThan(formulas.length / 2);
  });

  for (const seed of [8101, 8102, 8103]) {
    it(`in a shuffled order with warm-ups, one memory throughout (seed ${seed})`, () => {
      const random = generator(seed);
      const order = formulas.map((f) => ({ f, r: random() })).sort((a, b) => a.r - b.r).map((e) => e.f);
      forgetSolves();
      const differ: string[] = [];
      for (const f of order) {
        if (random() < 0.7) {
          for (let k = 0; k < 3; k++) {
            const near = f.T * (1 + 0.09 * (2 * random() - 1));
            for (const fn of [gapLow, gapHigh, spinLow]) {
              try { fn(near, f.card); } catch { /* an error is an answer too */ }
            }
            try { U('GAPLOW', near, f.card); } catch { /* idem */ }
          }
        }
        const got = JSON.stringify(shown(f));
        if (got !== fresh.get(f.text)) differ.push(`${f.text}: ${got} after others, ${fresh.get(f.text)} fresh`);
      }
      expect(differ).toEqual([]);
    });
  }
});
