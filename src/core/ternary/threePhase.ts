/**
 * Three-phase triangles at fixed T: faces of the lower convex envelope of g with three vertices.
 * Feeds on a triangular grid (step 1/12, interior nodes) are split (./split.ts); every three-phase
 * answer is a triangle, the same triangle found from several feeds is kept once, and a feed that
 * already lies in a known triangle is not split again. A triangle that holds no grid feed (narrower
 * than about 1/12, as near a critical end point) is not found.
 */
import { fail, kelvin, MixgapError, msg } from '../errors';
import type { TernaryModel } from './model';
import { splitFeed, type TernaryPoint } from './split';

export interface ThreePhaseTriangle {
  /** The three phases in the spec's order (increasing x_C, then x_B). */
  phases: [TernaryPoint, TernaryPoint, TernaryPoint];
  /** The common chemical potentials mu_A, mu_B, mu_C (per mole of sites for Flory–Huggins), J/mol. */
  mu: [number, number, number];
}

const N = 12;

/** Whether z lies in the triangle: its barycentric coordinates (Cramer's rule on the three fractions) are >= 0. */
function inside(t: ThreePhaseTriangle, z: TernaryPoint): boolean {
  const [p, q, r] = t.phases;
  const det = (a: TernaryPoint, b: TernaryPoint, c: TernaryPoint) =>
    a.xA * (b.xB * c.xC - b.xC * c.xB) - a.xB * (b.xA * c.xC - b.xC * c.xA) + a.xC * (b.xA * c.xB - b.xB * c.xA);
  const D = det(p, q, r);
  const l = [det(z, q, r) / D, det(p, z, r) / D, det(p, q, z) / D];
  return l.every((v) => v >= -1e-12);
}

const near = (p: TernaryPoint, q: TernaryPoint) => Math.hypot(p.xA - q.xA, p.xB - q.xB, p.xC - q.xC) < 1e-6;

/** Every three-phase triangle at T, ordered by their first phases (increasing x_C, then x_B). */
export function threePhaseTriangles(model: TernaryModel, T: number): ThreePhaseTriangle[] {
  const found: ThreePhaseTriangle[] = [];
  let failures = 0, tried = 0, firstFailure: MixgapError | undefined;
  for (let i = 1; i < N; i++) {
    for (let j = 1; i + j < N; j++) {
      const z = { xA: i / N, xB: j / N, xC: (N - i - j) / N };
      if (found.some((t) => inside(t, z))) continue;
      tried++;
      let r;
      try {
        r = splitFeed(model, T, z.xA, z.xB, z.xC);
      } catch (e) {
        if (!(e instanceof MixgapError) || e.reason !== 'convergence') throw e;
        failures++;
        firstFailure ??= e;
        continue;
      }
      if (r.phases.length !== 3) continue;
      const phases = r.phases as [TernaryPoint, TernaryPoint, TernaryPoint];
      if (found.some((t) => t.phases.every((p, k) => near(p, phases[k])))) continue;
      found.push({ phases, mu: r.mu });
    }
  }
  if (failures > 0 && failures === tried) fail('convergence', msg`no phase split converged at T = ${kelvin(T)} (${firstFailure?.message ?? ''})`);
  return found.sort((s, t) => s.phases[0].xC - t.phases[0].xC || s.phases[0].xB - t.phases[0].xB);
}
