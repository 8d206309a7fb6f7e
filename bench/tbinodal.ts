/**
 * Bench section of the ternary binodal table (TBINODAL): a 200-row table of an invented
 * extraction system (a gap on the A–C edge, traced to its plait point), each run at a new
 * temperature. Called from bench/run.ts with its `report`.
 */
import { binodalTable } from '../src/core/ternary/binodalCurve';
import { ternaryRedlichKister } from '../src/core/ternary/redlichKister';
import type { Report } from './timing';


export function tbinodalBench(report: Report): void {
  // invented: L_AC = 7500 J/mol (a gap below about 451 K), weak A–B and B–C terms
  const model = ternaryRedlichKister({
    AB: [{ a: 2500, b: 0, c: 0 }],
    AC: [{ a: 7500, b: 0, c: 0 }, { a: 400, b: 0, c: 0 }],
    BC: [{ a: 1200, b: 0, c: 0 }],
  });
  const times: number[] = [];
  for (let run = 0; run < 23; run++) {
    const T = 290 + 0.37 * run; // a new temperature every run: nothing is reused
    const t0 = performance.now();
    binodalTable(model, T, 200);
    if (run >= 3) times.push(performance.now() - t0); // the first runs warm the JIT
  }
  const median = [...times].sort((a, b) => a - b)[Math.floor(times.length / 2)];
  report('200-tie-line binodal table (TBINODAL core, new temperature each run)', `${median.toFixed(2)} ms`, 'target < 50 ms');
}
