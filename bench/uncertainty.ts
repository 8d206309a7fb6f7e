/**
 * Bench section of UNCERTAINTY (src/functions/uncertainty.ts): the time of a standard uncertainty
 * beside the time of the result itself, both at a new temperature (or a new card) on every call,
 * so that no call is answered from the solve memory. Target (issue 13): < 10 x the result.
 * Alone: node dist/node/bench.js uncertainty
 */
import * as cells from '../src/functions/functions';
import { uncertainty } from '../src/functions/uncertainty';

type Report = (what: string, value: string, target?: string) => void;

const median = (v: number[]) => [...v].sort((a, b) => a - b)[Math.floor(v.length / 2)];
const fmt = (us: number) => (us < 1000 ? `${us.toFixed(2)} µs` : `${(us / 1000).toFixed(2)} ms`);

/** Median time per call (µs) of `call(i)` over `batches` batches of `size` calls with distinct i. */
function perCall(call: (i: number) => unknown, batches: number, size: number): number {
  let i = 0;
  for (let w = 0; w < size * 2; w++) call(i++); // warm-up (JIT)
  const times: number[] = [];
  for (let b = 0; b < batches; b++) {
    const t0 = performance.now();
    for (let k = 0; k < size; k++) call(i++);
    times.push(((performance.now() - t0) * 1000) / size);
  }
  return median(times);
}

/** An invented card with three uncertain, correlated parameters (benchmark input only). */
const card = (L0: number) => [
  ['model', 'rk'], ['L0', L0], ['L0.b', -2], ['L1', 3000],
  ['u(L0)', 150], ['u(L0.b)', 0.1], ['u(L1)', 120], ['r(L0, L0.b)', 0.3], ['r(L0, L1)', -0.6],
];

export function uncertaintySection(report: Report): void {
  const fixed = card(20000);
  const T = (i: number) => 600 + ((i * 0.6180339887) % 1) * 300;
  const low = perCall((i) => cells.gapLow(T(i), fixed), 20, 50);
  const uLow = perCall((i) => uncertainty('GAPLOW', T(i) as never, fixed), 20, 50);
  report('GAPLOW, new temperature each call, 3-parameter card', fmt(low));
  report('UNCERTAINTY("GAPLOW", ...), same card and temperatures', fmt(uLow));
  report('  its ratio to GAPLOW', `${(uLow / low).toFixed(1)} x`, 'target < 10 x');
  // A new card on every call: the critical-point search is not remembered from call to call.
  const tc = perCall((i) => cells.tCrit(card(20000 + (i % 100000) * 0.01)), 5, 4);
  const uTc = perCall((i) => uncertainty('TCRIT', card(20000 + (i % 100000) * 0.01)), 5, 4);
  report('TCRIT, new card each call', fmt(tc));
  report('UNCERTAINTY("TCRIT", ...), new card each call', fmt(uTc));
  report('  its ratio to TCRIT', `${(uTc / tc).toFixed(1)} x`, 'target < 10 x');
}
