/**
 * Messages with quantities (src/core/errors.ts): a failure carries its temperatures and energies as
 * numbers, written in whatever units the reader asks for; numbers typed by a user come back as
 * typed after a unit conversion, computed ones to 6 significant digits.
 * common practice, no published source (how numbers are shown to people)
 */
import { describe, expect, it } from 'vitest';
import { fail, formatNumber, joulesPerMole, kelvin, MixgapError, msg } from '../../src/core/errors';

describe('formatNumber', () => {
  it('a typed number after a round trip through kelvin is the number typed', () => {
    expect(formatNumber(929.46 + 273.15)).toBe('1202.61'); // 1202.6100000000001 in binary
    expect(formatNumber(929.46 + 273.15 - 273.15)).toBe('929.46'); // 929.4600000000000364
    expect(formatNumber(800 - 273.15)).toBe('526.85');
    expect(formatNumber(20000 - 273.15)).toBe('19726.85');
    expect(formatNumber(1234.56789)).toBe('1234.56789');
  });
  it('a computed number to 6 significant digits', () => {
    expect(formatNumber(21000 / (2 * 8.314462618))).toBe('1262.86');
    expect(formatNumber(1 / 3)).toBe('0.333333');
  });
  it('0 and non-finite numbers as they are', () => {
    expect(formatNumber(0)).toBe('0');
    expect(formatNumber(Infinity)).toBe('Infinity');
  });
});

describe('MixgapError with quantities', () => {
  const error = (() => {
    try {
      fail('none', msg`no gap at T = ${kelvin(1202.61)} below ${joulesPerMole(21000)}, gap ${2}`);
    } catch (e) {
      return e as MixgapError;
    }
  })();
  it('message: kelvin and J/mol', () => {
    expect(error).toBeInstanceOf(MixgapError);
    expect(error.message).toBe('no gap at T = 1202.61 K below 21000 J/mol, gap 2');
  });
  it('text(units): the reader\'s units, from the numbers (no message text parsed)', () => {
    const units = { temperature: (K: number) => `${formatNumber(K - 273.15)} °C`, energy: (J: number) => `${formatNumber(J / 1000)} kJ/mol` };
    expect(error.text(units)).toBe('no gap at T = 929.46 °C below 21 kJ/mol, gap 2');
  });
  it('a plain text message stays as it is', () => {
    expect(new MixgapError('input', 'bad').text({ temperature: () => 'X', energy: () => 'Y' })).toBe('bad');
  });
});
