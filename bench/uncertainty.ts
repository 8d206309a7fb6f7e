/**
 * Bench section of UNCERTAINTY (src/functions/uncertainty.ts): the time of a standard uncertainty
 * beside the time of the result itself, both at a new temperature (or a new card) on every call,
 * so that no call is answered from the solve memory. Target (issue 13): < 10 x the result.
 * Alone: node dist/node/bench.js uncertainty
 */
import * as cells from '../src/functions/functions';
import { uncertainty } from '../src/functions/uncertainty';
import { fmt, perCall, type Report } from './timing';



/** An invented card with three uncertain, correlated parameters (benchmark input only). */
const card = (L0: number) => [
  ['model', 'rk'], ['L0', L0], ['L0.b', -2], ['L1', 3000],
  ['u(L0)', 150], ['u(L0.b)', 0.1], ['u(L1)', 120], ['r(L0, L0.b)', 0.3], ['r(L0, L1)', -0.6],
];

export function uncertaintySection(report: Report): void {
  const fixed = card(20000);
  const T = (i: number) => 600 + ((i * 0.6180339887) % 1) * 300;
  const low = perCall((i) => cells.gapLow(T(i), fixed), 20, 50, 2);
  const uLow = perCall((i) => uncertainty('GAPLOW', T(i) as never, fixed), 20, 50, 2);
  report('GAPLOW, new temperature each call, 3-parameter card', fmt(low));
  report('UNCERTAINTY("GAPLOW", ...), same card and temperatures', fmt(uLow));
  report('  its ratio to GAPLOW', `${(uLow / low).toFixed(1)} x`, 'target < 10 x');
  // A new card on every call: the critical-point search is not remembered from call to call.
  const tc = perCall((i) => cells.tCrit(card(20000 + (i % 100000) * 0.01)), 5, 4, 2);
  const uTc = perCall((i) => uncertainty('TCRIT', card(20000 + (i % 100000) * 0.01)), 5, 4, 2);
  report('TCRIT, new card each call', fmt(tc));
  report('UNCERTAINTY("TCRIT", ...), new card each call', fmt(uTc));
  report('  its ratio to TCRIT', `${(uTc / tc).toFixed(1)} x`, 'target < 10 x');
}
