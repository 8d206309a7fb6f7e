/**
 * The same formula gives the same number, whatever was computed before: the fixed set of formulas
 * (fixed-results.ts), each evaluated in a fresh state, against the same formulas evaluated in
 * shuffled orders (named seeds) with the solve memory kept between them and warm-ups at nearby
 * temperatures before each (so that solves start from a neighbour's answer), and against a child
 * process (`mixgap eval --json`) that evaluates them in another shuffled order. Bit for bit.
 */
import { spawnSync } from 'child_process';
import { existsSync } from 'fs';
import path from 'path';
import { describe, expect, it } from 'vitest';
import { forgetSolves } from '../../src/core/equilibrium';
import * as fns from '../../src/functions/functions';
import { evaluate, FORMULAS, formulaText, hexOf, type Formula, type Shown } from './fixed-results';
import { generator, shuffled } from './support/random';

const fresh = new Map<string, Shown>();
const freshOf = (f: Formula) => {
  const key = formulaText(f);
  if (!fresh.has(key)) fresh.set(key, evaluate(f, true));
  return fresh.get(key)!;
};

/** A warm-up before a formula: GAPLOW, SPINLOW and a small GAPTABLE of its system at temperatures near its own. */
function warmUp(f: Formula, random: () => number): void {
  const T = f.fn === 'gapTable' ? (f.args[0] as number) : f.args.find((a, i) => i <= 1 && typeof a === 'number' && a > 1) as number | undefined;
  const card = f.args.find((a) => Array.isArray(a) || (typeof a === 'number' && Math.abs(a) >= 1000 && a !== T)) ?? f.args[f.args.length - 1];
  if (T === undefined) return;
  for (let k = 0; k < 3; k++) {
    const near = T * (1 + 0.09 * (2 * random() - 1));
    try { fns.gapLow(near, card as any); } catch { /* an error is an answer too */ }
    try { fns.spinLow(near, card as any); } catch { /* idem */ }
  }
  try { fns.gapTable(T * 0.95, T * 1.05, 5, card as any); } catch { /* idem */ }
}

describe('results do not depend on what was computed before', () => {
  for (const seed of [7101, 7102, 7103]) {
    it(`the fixed set in a shuffled order with warm-ups, one memory throughout (seed ${seed})`, () => {
      const random = generator(seed);
      const order = shuffled(FORMULAS, random);
      const want = order.map(freshOf);
      forgetSolves();
      const differ: string[] = [];
      order.forEach((f, i) => {
        if (random() < 0.7) warmUp(f, random);
        const got = evaluate(f, false);
        if (JSON.stringify(got) !== JSON.stringify(want[i])) differ.push(`${formulaText(f)}: ${JSON.stringify(got)} after others, ${JSON.stringify(want[i])} fresh`);
      });
      expect(differ).toEqual([]);
    });
  }

  it('a child process (mixgap eval --json) evaluating them in another shuffled order (seed 7104)', () => {
    const root = path.join(__dirname, '..', '..');
    const bin = path.join(root, 'bin', 'mixgap.js');
    expect(existsSync(path.join(root, 'dist', 'node', 'cli.js')), 'run `npm run build`').toBe(true);
    const order = shuffled(FORMULAS, generator(7104));
    const p = spawnSync(process.execPath, [bin, 'eval', '--json', ...order.map(formulaText)], { encoding: 'utf8', cwd: root, maxBuffer: 64 << 20 });
    expect(p.status, p.stderr).toBe(0);
    // JSON numbers are the shortest text that reads back as the same double: no rounding here
    const shown = (v: unknown): Shown => {
      if (Array.isArray(v)) return v.map(shown);
      if (typeof v === 'number') return hexOf(v);
      if (v && typeof v === 'object' && 'error' in v) return (v as { error: string }).error;
      return `text:${String(v)}`;
    };
    const got = (JSON.parse(p.stdout) as unknown[]).map(shown);
    const differ = order.filter((f, i) => JSON.stringify(got[i]) !== JSON.stringify(freshOf(f)))
      .map((f) => `${formulaText(f)}: ${JSON.stringify(got[order.indexOf(f)])} in the child, ${JSON.stringify(freshOf(f))} fresh`);
    expect(differ).toEqual([]);
  });
});
