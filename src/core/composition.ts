/**
 * Composition conversions of a binary A-B: mole fraction <-> mass fraction of B, molar masses from
 * chemical formulas, and phase amounts on a mass basis. Mole fractions here are those of the spec
 * (x = mole fraction of B); the same formulas hold for atom fractions of alloys.
 *
 *   w = x M_B / (x M_B + (1 - x) M_A)        x = (w / M_B) / (w / M_B + (1 - w) / M_A)
 */
import { ATOMIC_WEIGHTS, NO_STANDARD_WEIGHT } from './atomicWeights';
import { fail } from './errors';

function checkMasses(MA: number, MB: number): void {
  for (const [name, M] of [['A', MA], ['B', MB]] as const) {
    if (!(Number.isFinite(M) && M > 0)) fail('range', `the molar mass of ${name} must be a positive number of g/mol (got ${M})`);
  }
}

function checkFraction(v: number, what: string): void {
  if (!(v >= 0 && v <= 1)) fail('range', `${what} = ${v} must lie between 0 and 1`);
}

/** Mass fraction of B from its mole fraction x. */
export function massFraction(x: number, MA: number, MB: number): number {
  checkMasses(MA, MB);
  checkFraction(x, 'the mole fraction');
  const mB = x * MB, mA = (1 - x) * MA;
  return mB / (mA + mB);
}

/** Mole fraction of B from its mass fraction w. */
export function moleFraction(w: number, MA: number, MB: number): number {
  checkMasses(MA, MB);
  checkFraction(w, 'the mass fraction');
  const nB = w / MB, nA = (1 - w) / MA;
  return nB / (nA + nB);
}

/**
 * Lever rule on a mass basis: of an overall mole fraction x0 inside a gap (x', x''), the mass
 * fraction in the B-rich phase is (w0 - w')/(w'' - w'), with each w the mass fraction of B; the
 * A-rich phase holds the rest. Outside [x', x''] the material is one phase (0 or 1).
 */
export function massPhaseFractions(x0: number, xLow: number, xHigh: number, MA: number, MB: number): { low: number; high: number } {
  checkMasses(MA, MB);
  for (const [v, what] of [[x0, 'x0'], [xLow, "x'"], [xHigh, "x''"]] as const) checkFraction(v, what);
  if (!(xLow < xHigh)) fail('input', `the A-rich phase x' = ${xLow} must be below the B-rich phase x'' = ${xHigh}`);
  const w0 = massFraction(x0, MA, MB), w1 = massFraction(xLow, MA, MB), w2 = massFraction(xHigh, MA, MB);
  const high = Math.min(1, Math.max(0, (w0 - w1) / (w2 - w1)));
  return { low: 1 - high, high };
}

/**
 * Molar mass (g/mol) of a chemical formula from IUPAC 2021 standard atomic weights: element symbols
 * with optional counts (decimals allowed), groups in parentheses or brackets with a count, and
 * adducts joined by a middle dot or "*" with an optional leading count ("CuSO4·5H2O").
 */
export function molarMass(formula: string): number {
  const text = formula.replace(/\s+/g, '');
  if (text === '') fail('input', 'the formula is empty: write element symbols such as "H2O" or "Fe"');
  return text.split(/[·*](?=\d*[A-Z(\[])/).reduce((sum, part) => {
    const lead = /^(\d+(?:\.\d+)?)(?=[A-Z(\[])/.exec(part);
    return sum + (lead ? Number(lead[1]) : 1) * formulaMass(lead ? part.slice(lead[1].length) : part, formula);
  }, 0);
}

function formulaMass(text: string, whole: string): number {
  let i = 0;
  const bad = (why: string): never => fail('input', `formula "${whole}": ${why}`);
  const count = (): number => {
    const m = /^\d+(?:\.\d+)?/.exec(text.slice(i));
    if (!m) return 1;
    i += m[0].length;
    const n = Number(m[0]);
    if (!(n > 0)) bad(`a count of ${m[0]} is not allowed`);
    return n;
  };
  const group = (close?: string): number => {
    let mass = 0;
    while (i < text.length) {
      const ch = text[i];
      if (ch === '(' || ch === '[') {
        i++;
        const inner = group(ch === '(' ? ')' : ']');
        mass += inner * count();
      } else if (ch === ')' || ch === ']') {
        if (ch !== close) bad(`unmatched "${ch}"`);
        i++;
        return mass;
      } else {
        const m = /^[A-Z][a-z]?/.exec(text.slice(i));
        if (!m) bad(`"${text.slice(i)}" is not an element symbol (symbols start with a capital letter: Fe, Cl, O)`);
        const symbol = m![0];
        i += symbol.length;
        const w = ATOMIC_WEIGHTS[symbol];
        if (w === undefined) {
          if (NO_STANDARD_WEIGHT.has(symbol)) bad(`${symbol} has no standard atomic weight (no stable isotope): give the molar mass as a number`);
          bad(`"${symbol}" is not an element symbol`);
        }
        mass += w * count();
      }
    }
    if (close) bad(`"${close === ')' ? '(' : '['}" is never closed`);
    return mass;
  };
  return group();
}
