/**
 * Unit slips (issue "What a new user tripped over", item 5): when energies look 1000 times too large
 * or too small, the message says so and suggests checking their unit, and TCRIT's #N/A says whether
 * the system is split at every temperature searched or at none.
 *
 * The systems are regular solutions, whose critical temperature is Tc = Omega / 2R and whose gap
 * boundary obeys ln[x/(1-x)] = Omega(2x-1)/RT (Porter, Easterling & Sherif, Phase Transformations
 * in Metals and Alloys, 3rd ed. 2009, section 1.3; the closed forms of docs/conventions.md).
 */
import { describe, expect, it } from 'vitest';
import * as fns from '../../src/functions/functions';
import { failure } from './support/failure';

const R = 8.314462618;

describe('energies in the wrong unit', () => {
  // Meant 21000 J/mol, typed under kJ/mol: Tc = 21e6 / 2R = 1.26e6 K, far above 20000 K, so the
  // system is split at every temperature searched.
  const tooLarge = [['model', 'regular'], ['omega', 21000], ['energy', 'kJ/mol']];
  // Meant 10 kJ/mol, typed as 10 J/mol: Tc = 10 / 2R = 0.60 K, below the 1 K where the search starts.
  const tooSmall = [['model', 'regular'], ['omega', 10]];

  it('the closed forms put these critical temperatures outside 1 K to 20000 K', () => {
    expect(21e6 / (2 * R)).toBeGreaterThan(20000);
    expect(10 / (2 * R)).toBeLessThan(1);
  });

  it('TCRIT of a system split at every temperature says so and suggests the energy unit', () => {
    const f = failure(() => fns.tCrit(tooLarge));
    expect(f.code).toBe('#N/A');
    expect(f.message).toMatch(/split into two phases at every temperature searched \(1 K to 20000 K\)/);
    expect(f.message).toMatch(/unit of the energies.*kJ\/mol/);
  });

  it('TCRIT of a system that never splits says so and suggests the energy unit', () => {
    const f = failure(() => fns.tCrit(tooSmall));
    expect(f.code).toBe('#N/A');
    expect(f.message).toMatch(/one phase at every temperature searched/);
    expect(f.message).toMatch(/unit of the energies.*1000 times too small/);
  });

  it('XCRIT and CRITKIND give the same reason', () => {
    expect(failure(() => fns.xCrit(tooLarge)).message).toBe(failure(() => fns.tCrit(tooLarge)).message);
    expect(failure(() => fns.critKind(tooSmall)).message).toBe(failure(() => fns.tCrit(tooSmall)).message);
  });

  it('a gap boundary beyond 1e-300 suggests the energy unit', () => {
    // Omega/RT = 21e6 / (8.314 * 800) = 3157: the boundary x' ~ exp(-3157), far below 1e-300.
    const f = failure(() => fns.gapLow(800, tooLarge));
    expect(f.code).toBe('#NUM!');
    expect(f.message).toMatch(/1e-300/);
    expect(f.message).toMatch(/unit of the energies/);
  });

  it('a system with a closing gap keeps the plain message (no unit hint)', () => {
    // Omega = 21000 J/mol: Tc = 1263 K inside the range; TCRIT answers, n = 2 does not exist.
    const f = failure(() => fns.tCrit(21000 as any, 2));
    expect(f.message).not.toMatch(/unit of the energies/);
    expect(fns.tCrit(21000 as any)).toBeCloseTo(21000 / (2 * R), 6);
  });
});
