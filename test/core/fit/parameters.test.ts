/**
 * Models as parameter vectors (src/core/fit/parameters.ts): every family of the registry through
 * its own card reader.
 */
import { describe, expect, it } from 'vitest';
import { criticalPoints } from '../../../src/core/critical';
import { MixgapError } from '../../../src/core/errors';
import { buildModel, parameterNames, startingValues } from '../../../src/core/fit/parameters';
import { floryHuggins, floryHugginsFamily } from '../../../src/core/models/floryHuggins';
import { FAMILIES } from '../../../src/core/models/index';
import { nrtl, nrtlFamily } from '../../../src/core/models/nrtl';
import { redlichKister, redlichKisterFamily, regularFamily, regularSolution } from '../../../src/core/models/redlichKister';

describe('buildModel gives the model the family\'s own factory gives', () => {
  it('regular, Redlich–Kister, Flory–Huggins, NRTL (same parameter text, the cache key)', () => {
    expect(buildModel(regularFamily, { omega: 20000 }).key).toBe(regularSolution(20000).key);
    expect(buildModel(redlichKisterFamily, { L0: 20000, 'L0.b': -3, L1: 0, L2: 500 }).key)
      .toBe(redlichKister([{ a: 20000, b: -3, c: 0 }, { a: 0, b: 0, c: 0 }, { a: 500, b: 0, c: 0 }]).key);
    expect(buildModel(floryHugginsFamily, { NA: 1, NB: 100, 'chi.A': 0.2, 'chi.B': 100 }).key).toBe(floryHuggins({ NA: 1, NB: 100, A: 0.2, B: 100 }).key);
    expect(buildModel(nrtlFamily, { a12: 1, b12: 2, a21: 3, b21: 4, alpha: 0.3 }).key).toBe(nrtl({ a12: 1, b12: 2, a21: 3, b21: 4, alpha: 0.3 }).key);
  });
  it('a parameter the family rejects is its input error', () => {
    expect(() => buildModel(floryHugginsFamily, { NA: 0.5, NB: 1, 'chi.A': 1 })).toThrow(MixgapError);
  });
});

describe('parameter names', () => {
  it('every family lists its card keys; Redlich–Kister as many terms as asked', () => {
    for (const f of FAMILIES) expect(parameterNames(f).length).toBeGreaterThan(0);
    expect(parameterNames(regularFamily)).toEqual(['omega']);
    expect(parameterNames(redlichKisterFamily, 2)).toEqual(['L0', 'L0.b', 'L0.c', 'L1', 'L1.b', 'L1.c']);
    expect(parameterNames(nrtlFamily)).toEqual(['a12', 'b12', 'a21', 'b21', 'alpha']);
  });
});

describe('default starting values put a gap near the data\'s temperature', () => {
  // The defaults aim at Tc = 1.25 Tref for the regular solution (Porter, Easterling & Sherif,
  // Phase Transformations in Metals and Alloys, 3rd ed. (2009), ch. 1: Tc = Omega / 2R) and at
  // chi = 1.2 chi_c for Flory–Huggins (Flory, Principles of Polymer Chemistry (1953), ch. XIII:
  // chi_c = (1/sqrt(NA) + 1/sqrt(NB))^2 / 2): the critical point of the start lies above Tref.
  for (const [family, spec] of [
    [regularFamily, [{ name: 'omega', free: true }]],
    [floryHugginsFamily, [{ name: 'NA', value: 1, free: false }, { name: 'NB', value: 200, free: false }, { name: 'chi.A', free: true }, { name: 'chi.B', free: true }]],
    ...[0.2, 0.3, 0.47].map((alpha) => [nrtlFamily, [{ name: 'a12', free: true }, { name: 'b12', free: true }, { name: 'a21', free: true }, { name: 'b21', free: true }, { name: 'alpha', value: alpha, free: false }]] as const),
  ] as const) {
    it(`${family.name}${family === nrtlFamily ? `, alpha = ${(spec.find((p) => p.name === 'alpha') as { value: number }).value}` : ''}`, () => {
      const Tref = 400;
      const model = buildModel(family, startingValues(spec, Tref));
      const points = criticalPoints(model);
      expect(points.length).toBeGreaterThan(0);
      expect(points[0].T).toBeGreaterThan(Tref);
    });
  }
});
