/**
 * Fit section of the benchmark (issue 13, "Speed"): `node dist/node/bench.js fit` runs it alone.
 *
 * - A 3-parameter nonlinear fit (Redlich–Kister L0, L0.b, L1, starts from the linear tie-line fit)
 *   to 50 mixed measurements of an invented system: 20 tie-lines, 15 single boundary points,
 *   14 cloud points and one critical temperature, computed by the forward solvers and given a
 *   fixed pseudo-random scatter (0.002 in composition, 0.3 K in temperature) so that the fit
 *   iterates as it would on real data. Target < 50 ms.
 * - The uncertainty of one result: the A-rich boundary at 700 K of the fitted model, by linear
 *   propagation of the fit's covariance (src/core/fit/propagation.ts: the value, one derivative per
 *   free parameter and the two ends of the band, each a model built from parameter values and a
 *   boundary solved), against the time of the boundary itself computed the same way (model from
 *   the fitted values, boundary). Target: ratio < 10.
 * Times are medians over repeated runs, each from scratch (a new fit, a new phase map).
 */
import { phaseMap } from '../src/core/binodal';
import { criticalPoints } from '../src/core/critical';
import type { Measurement } from '../src/core/fit/measurements';
import { fitModel, modelAt } from '../src/core/fit/nonlinear';
import { buildModel } from '../src/core/fit/parameters';
import { propagate } from '../src/core/fit/propagation';
import { gapTemperature } from '../src/core/gapTemperature';
import type { BinaryModel } from '../src/core/model';
import { redlichKisterFamily } from '../src/core/models/redlichKister';
import type { Report } from './timing';


const median = (v: number[]) => [...v].sort((a, b) => a - b)[Math.floor(v.length / 2)];
const fmt = (us: number) => (us < 1000 ? `${us.toFixed(2)} µs` : `${(us / 1000).toFixed(2)} ms`);

/**
 * Median wall and CPU time (µs) of `task`, run `runs` times after 2 warm-up runs. Wall time is
 * what a user waits, and counts waiting for a core on a busy machine; CPU time (user + system of
 * the process) is not slowed by other load but includes V8's garbage-collector threads, so it can
 * exceed wall time.
 */
function timed(task: () => unknown, runs: number): { wall: number; cpu: number } {
  for (let w = 0; w < 2; w++) task();
  const wall: number[] = [], cpu: number[] = [];
  for (let r = 0; r < runs; r++) {
    const c0 = process.cpuUsage();
    const t0 = performance.now();
    task();
    wall.push((performance.now() - t0) * 1000);
    const c = process.cpuUsage(c0);
    cpu.push(c.user + c.system);
  }
  return { wall: median(wall), cpu: median(cpu) };
}
const both = (t: { wall: number; cpu: number }) => `${fmt(t.wall)} / ${fmt(t.cpu)}`;

/** Fixed scatter: a linear congruential sequence mapped to [-1, 1] (Numerical Recipes' constants). */
function scatter(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return (s / 2 ** 32) * 2 - 1;
  };
}

/** The 50 measurements of the invented system (see the header). */
function measurements(): Measurement[] {
  const truth = buildModel(redlichKisterFamily, { L0: 24000, 'L0.b': -5, L1: 2500 });
  const critical = criticalPoints(truth);
  const noise = scatter(13);
  const data: Measurement[] = [];
  for (let i = 0; i < 20; i++) {
    const T = 500 + 12 * i;
    const g = phaseMap(truth.at(T)).gaps[0];
    data.push({ kind: 'tie-line', T, xLow: g.low.x + 0.002 * noise(), xHigh: g.high.x + 0.002 * noise(), sigma: 0.002 });
  }
  for (let i = 0; i < 15; i++) {
    const T = 506 + 15 * i, side = i % 2 ? 'high' as const : 'low' as const;
    data.push({ kind: 'boundary', T, x: phaseMap(truth.at(T)).gaps[0][side].x + 0.002 * noise(), side, sigma: 0.002 });
  }
  for (let i = 0; i < 14; i++) {
    const x0 = 0.08 + 0.06 * i;
    data.push({ kind: 'cloud point', x0, T: gapTemperature(truth, x0, critical) + 0.3 * noise(), sigma: 0.3 });
  }
  data.push({ kind: 'critical point', Tc: critical[0].T + 0.3 * noise(), sigmaT: 0.3 });
  return data;
}

export function fitSection(report: Report): void {
  console.log('\nFits and uncertainties (issue 13)');
  const data = measurements();
  const spec = [{ name: 'L0', free: true }, { name: 'L0.b', free: true }, { name: 'L1', free: true }];
  const fit = fitModel(redlichKisterFamily, spec, data);
  report(`3-parameter nonlinear fit to 50 mixed measurements (${fit.iterations} iterations, ${fit.rows.length} residuals): wall / CPU`, both(timed(() => fitModel(redlichKisterFamily, spec, data), 15)), 'target < 50 ms');

  const T = 700;
  const low = (model: BinaryModel) => phaseMap(model.at(T)).gaps[0].low.x;
  // one call is ~20 µs, below the CPU clock's resolution: timed in batches of 100
  const batch = (task: () => unknown) => () => { for (let i = 0; i < 100; i++) task(); };
  // the result itself as propagation computes each of its values: the model built from the
  // parameter values (as from a card), then the boundary solved
  const one = timed(batch(() => low(modelAt(fit, fit.free.map((n) => fit.values[n])))), 40);
  const withSigma = timed(batch(() => propagate(fit, low, 'the A-rich boundary')), 40);
  const bare = timed(batch(() => low(fit.model)), 40);
  const u = propagate(fit, low, 'the A-rich boundary');
  const per = (t: { wall: number; cpu: number }) => ({ wall: t.wall / 100, cpu: t.cpu / 100 });
  report(`A-rich boundary at ${T} K from the fitted values (x = ${u.value.toFixed(4)}): wall / CPU`, both(per(one)));
  report(`same with its standard uncertainty by propagation (u = ${u.sigma.toExponential(2)}): wall / CPU`, both(per(withSigma)));
  report('uncertainty / result time: wall / CPU', `${(withSigma.wall / one.wall).toFixed(1)}x / ${(withSigma.cpu / one.cpu).toFixed(1)}x`, 'target < 10');
  report(`(boundary alone on the model already built: ${both(per(bare))}; propagation / that, wall / CPU)`, `${(withSigma.wall / bare.wall).toFixed(1)}x / ${(withSigma.cpu / bare.cpu).toFixed(1)}x`);
}
