/**
 * Three-component benchmark section (`npm run bench`, or this part alone: node dist/node/bench.js
 * ternary): the phase split of a feed at a new temperature, a warm split at a neighbouring feed
 * and temperature (Newton from the neighbour's tie-line plus the full tangent-plane check, as the
 * cascade's stages use it), and a 10-stage counter-current cascade. Invented system (benchmark
 * input only): carrier A and solvent C nearly immiscible, solute B miscible with both.
 */
import { counterCurrent } from '../src/core/ternary/extraction';
import { ternaryRedlichKister } from '../src/core/ternary/redlichKister';
import { splitFeed, splitFrom } from '../src/core/ternary/split';
import { fmt, perCall, whole, type Report } from './timing';

// this section's batches: 20 x 20 calls after 3 batches of warm-up; whole tasks 15 runs after 2
const perCallT = (call: (i: number) => unknown, batches = 20, size = 20) => perCall(call, batches, size, 3);
const wholeT = (task: () => unknown, runs = 15) => whole(task, runs, 2);

export function ternaryBench(report: Report): void {
  const RT = 8.314462618 * 298.15;
  const model = ternaryRedlichKister({ AB: [{ a: 1.2 * RT, b: 0, c: 0 }], AC: [{ a: 3.4 * RT, b: 0, c: 0 }], BC: [{ a: 0.4 * RT, b: 0, c: 0 }] });
  const z = (i: number) => ({ xA: 0.44 - 0.02 * ((i * 0.6180339887) % 1), xB: 0.11, xC: 0.45 + 0.02 * ((i * 0.6180339887) % 1) });
  report('ternary split of a feed at a new temperature (cold: samples, envelope, Newton, check)',
    fmt(perCallT((i) => { const p = z(i); return splitFeed(model, 290 + ((i * 0.7548776662) % 1) * 20, p.xA, p.xB, p.xC); })), 'target < 2 ms');
  report('same, a new feed at the temperature of the last call (samples kept)',
    fmt(perCallT((i) => { const p = z(i); return splitFeed(model, 298.15, p.xA, p.xB, p.xC); })));
  // warm: each call starts from the tie-line of the previous call's feed (1e-4 away) or
  // temperature (0.01 K away); a new temperature also recomputes g on the check's samples
  let last = splitFeed(model, 298.15, 0.44, 0.11, 0.45);
  const warm = (T: number, p: { xA: number; xB: number; xC: number }) => {
    const r = splitFrom(model, T, p, last.phases, true) ?? splitFeed(model, T, p.xA, p.xB, p.xC);
    last = r;
    return r;
  };
  report('ternary split at a neighbouring feed, warm (Newton from its tie-line, checked)', fmt(perCallT((i) => {
    const step = i % 200;
    return warm(298.15, { xA: 0.44 - 1e-4 * step, xB: 0.11, xC: 0.45 + 1e-4 * step });
  })), 'target < 100 µs');
  last = splitFeed(model, 298.15, 0.44, 0.11, 0.45);
  report('ternary split at a neighbouring T, warm (same, and g on the samples at the new T)', fmt(perCallT((i) => warm(298.15 + 0.01 * (i % 200), { xA: 0.44, xB: 0.11, xC: 0.45 }))), 'target < 100 µs');
  const feed = { amount: 100, x: { xA: 0.8, xB: 0.2, xC: 0 } }, solvent = { amount: 80, x: { xA: 0, xB: 0, xC: 1 } };
  report('10-stage counter-current cascade (Newton on the stage equations)', fmt(wholeT(() => counterCurrent(model, 298.15, feed, solvent, 10))), 'target < 20 ms');
}
