/** Physical constants (see docs/conventions.md). */

/** Molar gas constant, J/(mol K): CODATA 2018, exact by the 2019 SI definitions. */
export const R = 8.314462618;

/** Avogadro constant, 1/mol (exact). */
export const AVOGADRO = 6.02214076e23;

/** Elementary charge: 1 eV in J (exact). */
export const ELECTRONVOLT = 1.602176634e-19;

/** Thermochemical calorie in J (exact by definition). */
export const CALORIE = 4.184;

/** The temperature window in which Mixgap looks for critical points and gap temperatures, K (see limits.ts). */
export { T_SEARCH_MAX, T_SEARCH_MIN } from './limits';
