/**
 * The argument readers shared by every cell function (src/functions/cells.ts): the same bad input
 * gives the same error code whichever function reads it (#VALUE! for text or TRUE/FALSE, #NUM! for
 * a number out of range, NaN and infinity included), and choice words read alike everywhere.
 */
import { describe, expect, it } from 'vitest';
import { fitNrtl, fitTieLines, gapResid, phaseMassFrac } from '../../src/functions/fitting';
import { gapLow, phaseFrac } from '../../src/functions/functions';
import { failure } from './support/failure';

// Invented tie-lines of a symmetric system (no published source: only the readers are tested here).
const tieLine = (T: unknown) => [[T, 0.1, 0.9]];

describe('numbers inside ranges: one code per kind of mistake, in params and in fit data alike', () => {
  for (const [what, bad, code] of [
    ['infinity', Infinity, '#NUM!'],
    ['NaN', NaN, '#NUM!'],
    ['text', 'hot', '#VALUE!'],
    ['TRUE', true, '#VALUE!'],
  ] as const) {
    it(what, () => {
      const inParams = failure(() => gapLow(800, [[21000, bad, 0]] as any));
      const inData = failure(() => fitTieLines(tieLine(bad) as any, 1));
      expect(inParams.code).toBe(code);
      expect(inData.code).toBe(code);
      if (code === '#NUM!') for (const e of [inParams, inData]) expect(e.message).toContain('is not a finite number');
    });
  }
});

describe('choice words', () => {
  it('phase reads "low"/"high" in any case, with spaces, in every function that takes it', () => {
    const card = 21000 as any;
    expect(phaseFrac(0.3, 800, card, ' LOW ')).toBe(phaseFrac(0.3, 800, card, 'low'));
    expect(phaseMassFrac(0.3, 0.1, 0.9, 10, 20, 'High')).toBe(phaseMassFrac(0.3, 0.1, 0.9, 10, 20));
    expect(gapResid(800, 0.2, card, 'HIGH')).toBe(gapResid(800, 0.2, card, 'high'));
  });

  it('a wrong phase word is #VALUE! listing the words, and GAPRESID needs one', () => {
    for (const e of [failure(() => phaseFrac(0.3, 800, 21000 as any, 'middle')), failure(() => phaseMassFrac(0.3, 0.1, 0.9, 10, 20, 'middle'))]) {
      expect(e.code).toBe('#VALUE!');
      expect(e.message).toBe('phase = "middle": write "low" (the A-rich phase) or "high" (the B-rich phase)');
    }
    const missing = failure(() => gapResid(800, 0.2, 21000 as any, undefined as any));
    expect(missing.code).toBe('#VALUE!');
    expect(missing.message).toContain('phase = "": write "low"');
  });

  it('result and form words', () => {
    const data = [[600, 0.05, 0.95], [700, 0.1, 0.9], [800, 0.2, 0.8]];
    expect(fitTieLines(data, 1, undefined, 'Coefficients')).toEqual(fitTieLines(data, 1));
    expect(failure(() => fitTieLines(data, 1, undefined, 'both')).message).toBe('result = "both": write "coefficients" or "errors"');
    expect(fitNrtl(300, 0.05, 0.9, 0.3, 'CONSTANT')).toEqual(fitNrtl(300, 0.05, 0.9, 0.3, 'constant'));
    const e = failure(() => fitNrtl(300, 0.05, 0.9, 0.3, 'linear'));
    expect(e.code).toBe('#VALUE!');
    expect(e.message).toBe('form = "linear": write "1/T" (tau = b/T) or "constant" (tau = a)');
  });
});
