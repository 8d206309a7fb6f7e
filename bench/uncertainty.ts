/**
 * Bench section of UNCERTAINTY (src/functions/uncertainty.ts): the time of a standard uncertainty
 * beside the time of the result itself, both at a new temperature (or a new card) on every call,
 * so that no call is answered from the solve memory. Target (issue 13): < 10 x the result.
 * GAPLOW and its UNCERTAINTY are first run on other temperatures until both are compiled, then
 * timed in alternate batches (GAPLOW at new temperatures, then UNCERTAINTY at the first of the
 * same temperatures), so that a busy machine or a late compilation slows both alike: medians of
 * each and of the ratios of the pairs of batches, in wall and in CPU time.
 * Alone: node dist/node/bench.js uncertainty
 */
import * as cells from '../src/functions/functions';
import { uncertainty } from '../src/functions/uncertainty';
import { fmt, median, perCall, type Report } from './timing';



/** An invented card with three uncertain, correlated parameters (benchmark input only). */
const card = (L0: number) => [
  ['model', 'rk'], ['L0', L0], ['L0.b', -2], ['L1', 3000],
  ['u(L0)', 150], ['u(L0.b)', 0.1], ['u(L1)', 120], ['r(L0, L0.b)', 0.3], ['r(L0, L1)', -0.6],
];

export function uncertaintySection(report: Report): void {
  const fixed = card(20000);
  const T = (i: number) => 600 + ((i * 0.6180339887) % 1) * 300;
  // warm-up on temperatures that are not timed (indices from 10^6 on)
  for (let i = 0; i < 2000; i++) cells.gapLow(T(1e6 + i), fixed);
  for (let i = 0; i < 600; i++) uncertainty('GAPLOW', T(1e6 + i) as never, fixed);
  // Batches of about the same length (a few ms), so that waiting for a core hits both alike;
  // CPU time (user + system of this process) does not count that wait.
  const size = 200, uSize = 20;
  const wall = { low: [] as number[], uLow: [] as number[], ratio: [] as number[] };
  const cpu = { low: [] as number[], uLow: [] as number[], ratio: [] as number[] };
  const timed = (n: number, call: (k: number) => unknown) => {
    const t0 = performance.now(), c0 = process.cpuUsage();
    for (let k = 0; k < n; k++) call(k);
    const c = process.cpuUsage(c0);
    return { wall: ((performance.now() - t0) * 1000) / n, cpu: (c.user + c.system) / n };
  };
  for (let b = 0, i = 0; b < 31; b++, i += size) {
    const low = timed(size, (k) => cells.gapLow(T(i + k), fixed));
    const uLow = timed(uSize, (k) => uncertainty('GAPLOW', T(i + k) as never, fixed));
    for (const [to, key] of [[wall, 'wall'], [cpu, 'cpu']] as const) {
      to.low.push(low[key]); to.uLow.push(uLow[key]); to.ratio.push(uLow[key] / low[key]);
    }
  }
  report('GAPLOW, new temperature each call, 3-parameter card: wall / CPU', `${fmt(median(wall.low))} / ${fmt(median(cpu.low))}`);
  report('UNCERTAINTY("GAPLOW", ...), same card and temperatures: wall / CPU', `${fmt(median(wall.uLow))} / ${fmt(median(cpu.uLow))}`);
  report('  its ratio to GAPLOW (median of alternate batches): wall / CPU', `${median(wall.ratio).toFixed(1)} x / ${median(cpu.ratio).toFixed(1)} x`, 'target < 10 x');
  // A new card on every call: the critical-point search is not remembered from call to call.
  const tc = perCall((i) => cells.tCrit(card(20000 + (i % 100000) * 0.01)), 5, 4, 2);
  const uTc = perCall((i) => uncertainty('TCRIT', card(20000 + (i % 100000) * 0.01)), 5, 4, 2);
  report('TCRIT, new card each call', fmt(tc));
  report('UNCERTAINTY("TCRIT", ...), new card each call', fmt(uTc));
  report('  its ratio to TCRIT', `${(uTc / tc).toFixed(1)} x`, 'target < 10 x');
}
