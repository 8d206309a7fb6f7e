/**
 * A model as a parameter vector: the parameters a fit can move are the keys of the family's card
 * (omega; L0, L0.b, L0.c, L1, ...; NA, NB, chi.A, chi.B; a12, b12, a21, b21, alpha), in SI units
 * (energies in J/mol, temperatures in K). Values become a model through the family's own
 * `fromCard`, so every family of the registry can be fitted without a line of its own here.
 *
 * Two numbers per parameter matter to the numerics and are derived from the key:
 * - its `unit` at a reference temperature Tref: the change of the parameter that changes g/RT by
 *   about 1 (L_k: R Tref; L_k.b: R; L_k.c: R / ln Tref; chi.A, a_ij: 1; chi.B, b_ij: Tref; chain
 *   lengths 1; alpha 0.1). It scales finite-difference steps and convergence tests.
 * - its default starting value, for a free parameter the user gives none: a system with a gap
 *   near Tref (L0 = omega = 2.5 R Tref, i.e. Tc = 1.25 Tref for the regular solution; chi 1.2 times
 *   its critical value; NRTL taus 1.2 times those at which the system first splits at the given
 *   alpha, see nrtlStartTaus), and 0 for correction terms.
 */
import { R } from '../constants';
import { fail } from '../errors';
import { owns, type CardValues, type ModelFamily } from '../family';
import type { BinaryModel } from '../model';
import { nrtl } from '../models/nrtl';

/** One parameter of a fit: its card key, its value (the start when free), whether the fit moves it. */
export interface ParameterSpec {
  name: string;
  /** Fixed value, or starting value of a free parameter (optional: a default start is chosen). */
  value?: number;
  free: boolean;
}

/**
 * The parameters a fit of `family` can name: its card keys, and for an open-ended list (Redlich–
 * Kister: L1, L2, ...) those of `terms` terms (L_k, L_k.b, L_k.c each).
 */
export function parameterNames(family: ModelFamily, terms = 1): string[] {
  if (!family.moreKeys) return [...family.keys];
  const names: string[] = [];
  for (let k = 0; k < terms; k++) {
    for (const raw of [`L${k}`, `L${k}.b`, `L${k}.c`]) if (owns(family, raw)) names.push(raw);
  }
  return names.length > 0 ? names : [...family.keys];
}

/** Change of the parameter `name` that changes g/RT by about 1, at temperatures near Tref. */
export function parameterUnit(name: string, Tref: number): number {
  if (name === 'omega' || /^L\d+$/.test(name)) return R * Tref;
  if (/^L\d+\.b$/.test(name)) return R;
  if (/^L\d+\.c$/.test(name)) return R / Math.max(1, Math.log(Tref));
  if (name === 'chi.B' || name === 'b12' || name === 'b21') return Tref;
  if (name === 'alpha') return 0.1;
  return 1;
}

/**
 * What a parameter's number measures on a card: an energy (omega, L_k: the card's energy unit), an
 * energy per kelvin (L_k.b, L_k.c), a temperature in kelvin (chi.B, b_ij: always kelvin) or a pure
 * number. Cards convert the first two with their energy unit; the others are written as they are.
 */
export function parameterDimension(name: string): 'energy' | 'energy per K' | 'K' | '1' {
  if (name === 'omega' || /^L\d+$/.test(name)) return 'energy';
  if (/^L\d+\.[bc]$/.test(name)) return 'energy per K';
  if (name === 'chi.B' || name === 'b12' || name === 'b21') return 'K';
  return '1';
}

/**
 * Starting taus (tau12, tau21) for NRTL at this alpha: 1.2 times the tau at which the symmetric
 * system (tau12 = tau21) first splits, i.e. x y g''/RT (Renon and Prausnitz, AIChE J. 14 (1968)
 * 135) falls to zero somewhere on x = 0.05, 0.1, ..., 0.95: found on a grid of tau in steps of
 * 0.1 up to 20 and refined by bisection (1.28 at alpha = 0.3, 2.69 at 0.47). Should the
 * symmetric system not split (tau G = tau exp(-alpha tau) is bounded by 1/(e alpha)), the first
 * splitting pair of the asymmetric grid tau12 = 0.5..20, tau21 = -tau12/4, times 1.2; (2.5, 2.5)
 * if none.
 */
export function nrtlStartTaus(alpha: number): [number, number] {
  if (!(alpha > 0)) return [2.5, 2.5];
  const splits = (t12: number, t21: number) => {
    const iso = nrtl({ a12: t12, b12: 0, a21: t21, b21: 0, alpha }).at(1);
    for (let i = 1; i < 20; i++) {
      const x = i / 20, y = 1 - x;
      if ((x * y * iso.d2g(x, y)) / iso.RT <= 0) return true;
    }
    return false;
  };
  for (let k = 1; k <= 200; k++) {
    if (!splits(0.1 * k, 0.1 * k)) continue;
    let lo = 0.1 * (k - 1), hi = 0.1 * k;
    for (let i = 0; i < 40; i++) {
      const mid = (lo + hi) / 2;
      if (splits(mid, mid)) hi = mid; else lo = mid;
    }
    return [1.2 * hi, 1.2 * hi];
  }
  for (let k = 1; k <= 40; k++) {
    const t = 0.5 * k;
    if (splits(t, -t / 4) && splits(1.2 * t, -1.2 * t / 4)) return [1.2 * t, -1.2 * t / 4];
  }
  return [2.5, 2.5];
}

/** The model of `family` with these parameter values (SI units), through the family's card reader. */
export function buildModel(family: ModelFamily, values: Readonly<Record<string, number>>): BinaryModel {
  const keys = Object.keys(values);
  const card: CardValues = {
    num: (key) => values[key],
    keys,
    energy: { name: 'J/mol', toJoulePerMole: 1 },
  };
  return family.fromCard(card).model;
}

/** Checks the names against the family and that fixed parameters have values. */
export function checkParameters(family: ModelFamily, parameters: readonly ParameterSpec[]): void {
  const seen = new Set<string>();
  for (const p of parameters) {
    if (!owns(family, p.name)) fail('input', `"${p.name}" is not a parameter of the ${family.name} model (its parameters: ${family.keys.join(', ')}${family.moreKeys ? `; ${family.moreKeys.note}` : ''})`);
    if (seen.has(p.name)) fail('input', `parameter ${p.name} is given twice`);
    seen.add(p.name);
    if (!p.free && p.value === undefined) fail('input', `parameter ${p.name} is fixed but has no value: give its value or let the fit move it`);
    if (p.value !== undefined && !Number.isFinite(p.value)) fail('input', `parameter ${p.name} must be a finite number (got ${p.value})`);
  }
  if (!parameters.some((p) => p.free)) fail('input', 'no parameter is free: mark at least one parameter to fit');
}

/**
 * Starting values: the given ones, else the defaults described above (chi and the taus chosen
 * from the fixed values, so that the start has a gap near Tref).
 */
export function startingValues(parameters: readonly ParameterSpec[], Tref: number): Record<string, number> {
  const values: Record<string, number> = {};
  for (const p of parameters) if (p.value !== undefined) values[p.name] = p.value;
  const unset = parameters.filter((p) => p.value === undefined).map((p) => p.name);
  for (const name of unset) values[name] = name === 'omega' || name === 'L0' ? 2.5 * R * Tref : name === 'alpha' ? 0.3 : 0;
  // Flory–Huggins: chi_c = (1/sqrt(NA) + 1/sqrt(NB))^2 / 2; aim at chi = 1.2 chi_c at Tref.
  if (unset.includes('chi.A') || unset.includes('chi.B')) {
    const NA = values.NA ?? 1, NB = values.NB ?? 1;
    const chi = 0.6 * (1 / Math.sqrt(Math.max(1, NA)) + 1 / Math.sqrt(Math.max(1, NB))) ** 2;
    if (unset.includes('chi.B')) values['chi.B'] = (chi - (values['chi.A'] ?? 0)) * Tref;
    else values['chi.A'] = chi - (values['chi.B'] ?? 0) / Tref;
  }
  // NRTL: the taus of nrtlStartTaus (2.5 on both sides at alpha = 0.3), carried by b_ij when it
  // is free, else by a_ij.
  if (['a12', 'b12', 'a21', 'b21'].some((n) => unset.includes(n))) {
    const taus = nrtlStartTaus(values.alpha ?? 0.3);
    for (const [a, b, tau] of [['a12', 'b12', taus[0]], ['a21', 'b21', taus[1]]] as const) {
      if (unset.includes(b)) values[b] = (tau - (values[a] ?? 0)) * Tref;
      else if (unset.includes(a)) values[a] = tau - (values[b] ?? 0) / Tref;
    }
  }
  return values;
}
