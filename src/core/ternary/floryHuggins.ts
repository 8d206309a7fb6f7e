/**
 * Flory–Huggins for three components, per mole of lattice sites, volume fractions phi_i, chain
 * lengths N_i:
 *   g/RT = sum_i (phi_i / N_i) ln phi_i + sum over pairs chi_ij phi_i phi_j,  chi_ij = A_ij + B_ij / T
 * The edge (i, j) is the binary Flory–Huggins model with N_A = N_i, N_B = N_j, chi = chi_ij, phi = phi_j.
 */
import { fail } from '../errors';
import type { CardValues } from '../family';
import { pairKey, PAIRS, type TernaryFamily } from './family';
import { EA, EAA, EAB, EAC, EB, EBB, EBC, EC, ECC, EG, TernaryIsothermBase, type TernaryModel } from './model';

/** chi = A + B / T (A dimensionless, B in K). */
export interface ChiTerm {
  A: number;
  B: number;
}

export interface TernaryFloryHugginsParameters {
  NA: number;
  NB: number;
  NC: number;
  chiAB: ChiTerm;
  chiAC: ChiTerm;
  chiBC: ChiTerm;
}

export function ternaryFloryHuggins(p: TernaryFloryHugginsParameters): TernaryModel {
  for (const name of ['NA', 'NB', 'NC'] as const) {
    if (!(Number.isFinite(p[name]) && p[name] >= 1)) fail('input', `Flory–Huggins chain length ${name} must be a number >= 1 (got ${p[name]})`);
  }
  for (const name of ['chiAB', 'chiAC', 'chiBC'] as const) {
    if (!(Number.isFinite(p[name]?.A) && Number.isFinite(p[name]?.B))) fail('input', `Flory–Huggins ${name}: A and B must be finite numbers (chi = A + B/T)`);
  }
  const { NA, NB, NC, chiAB, chiAC, chiBC } = p;
  return {
    key: `FH3:${NA},${NB},${NC},${chiAB.A},${chiAB.B},${chiAC.A},${chiAC.B},${chiBC.A},${chiBC.B}`,
    composition: 'volume fraction',
    sites: [NA, NB, NC],
    at: (T) => new FloryHugginsTernaryIsotherm(T, NA, NB, NC, chiAB.A + chiAB.B / T, chiAC.A + chiAC.B / T, chiBC.A + chiBC.B / T),
  };
}

/** g_E = RT sum chi_ij phi_i phi_j: d_i g_E = RT sum_j chi_ij phi_j, H_ij = RT chi_ij, H_ii = 0. */
class FloryHugginsTernaryIsotherm extends TernaryIsothermBase {
  constructor(T: number, NA: number, NB: number, NC: number, private readonly cAB: number, private readonly cAC: number, private readonly cBC: number) {
    super(T, 1 / NA, 1 / NB, 1 / NC);
  }

  protected excessG(a: number, b: number, c: number): number {
    return this.RT * (this.cAB * a * b + this.cAC * a * c + this.cBC * b * c);
  }

  protected excessLocal(a: number, b: number, c: number, e: Float64Array): void {
    const RT = this.RT, cAB = this.cAB, cAC = this.cAC, cBC = this.cBC;
    e[EG] = RT * (cAB * a * b + cAC * a * c + cBC * b * c);
    e[EA] = RT * (cAB * b + cAC * c);
    e[EB] = RT * (cAB * a + cBC * c);
    e[EC] = RT * (cAC * a + cBC * b);
    e[EAA] = 0; e[EBB] = 0; e[ECC] = 0;
    e[EAB] = RT * cAB; e[EAC] = RT * cAC; e[EBC] = RT * cBC;
  }
}

/** `chi.A` / `chi.B` (any case) after a pair prefix. */
function chiRest(rest: string): string | undefined {
  const m = /^chi\.([ab])$/i.exec(rest.trim());
  return m ? `chi.${m[1].toUpperCase()}` : undefined;
}

/** Cards `model | flory-huggins`: chain lengths NA, NB, NC and each pair's chi = chi.A + chi.B / T. */
export const ternaryFloryHugginsFamily: TernaryFamily = {
  name: 'flory-huggins',
  aliases: ['fh'],
  keys: ['NA', 'NB', 'NC', ...PAIRS.flatMap((p) => [`${p}.chi.A`, `${p}.chi.B`])],
  canonical(raw) {
    const t = raw.trim();
    const n = /^n([abc])$/i.exec(t);
    if (n) return `N${n[1].toUpperCase()}`;
    const p = pairKey(t);
    const rest = p && chiRest(p.rest);
    return p && rest ? `${p.pair}.${rest}` : undefined;
  },
  note: 'each pair AB, AC, BC has the binary keys chi.A, chi.B behind its prefix',
  composition: 'volume fraction',
  keyRows: [
    { keys: ['NA', 'NB', 'NC'], meaning: 'chain lengths in lattice sites (1 for a solvent)' },
    { keys: ['AB.chi.A', 'AB.chi.B', 'AC.chi.A', '...'], meaning: 'chi_ij = chi.A + chi.B / T of each pair (chi.B in K)' },
  ],
  fromCard(card: CardValues) {
    const N = ['NA', 'NB', 'NC'].map((k) => {
      const v = card.num(k);
      if (v === undefined) fail('input', `a ternary flory-huggins card needs "${k}" (chain length in lattice sites; 1 for a solvent)`);
      return v;
    });
    const chi = PAIRS.map((pair) => {
      const A = card.num(`${pair}.chi.A`), B = card.num(`${pair}.chi.B`);
      if (A === undefined && B === undefined) fail('input', `a ternary flory-huggins card needs "${pair}.chi.A" and/or "${pair}.chi.B" (chi of the pair ${pair[0]}–${pair[1]} = chi.A + chi.B / T, T in K)`);
      return { A: A ?? 0, B: B ?? 0 };
    });
    return {
      model: ternaryFloryHuggins({ NA: N[0], NB: N[1], NC: N[2], chiAB: chi[0], chiAC: chi[1], chiBC: chi[2] }),
      description: `ternary Flory–Huggins, NA = ${N[0]}, NB = ${N[1]}, NC = ${N[2]}, ${PAIRS.map((p, i) => `chi${p} = ${chi[i].A} + ${chi[i].B}/T`).join(', ')} (T in K)`,
    };
  },
};
