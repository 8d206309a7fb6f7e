/**
 * A fixed set of formulas gives today exactly what it gave when the record was written, bit for
 * bit (see fixed-results.ts). `npm run fixed-results` rewrites the record (MIXGAP_WRITE_FIXED=1);
 * a commit that does so says why, how many values changed and by how many ulp at most.
 * The record is our own code's output, a pin against unintended change, not a truth.
 */
import { readFileSync, writeFileSync } from 'fs';
import path from 'path';
import { describe, expect, it } from 'vitest';
import { FORMULAS, formulaText, record, type Shown } from './fixed-results';

const FILE = path.join(__dirname, 'fixed-results.json');

describe('fixed set of formulas, bit for bit', () => {
  if (process.env.MIXGAP_WRITE_FIXED) {
    it('rewrites the record', () => {
      writeFileSync(FILE, JSON.stringify(record(), null, 1) + '\n');
    });
    return;
  }
  const want = JSON.parse(readFileSync(FILE, 'utf8')) as Record<string, Shown>;

  it('the record covers exactly the fixed set', () => {
    expect(Object.keys(want).sort()).toEqual(FORMULAS.map(formulaText).sort());
  });

  it('every formula gives the recorded bits (each in a fresh state)', () => {
    const got = record();
    const differ = Object.keys(want).filter((k) => JSON.stringify(got[k]) !== JSON.stringify(want[k]));
    expect(differ.map((k) => `${k}: got ${JSON.stringify(got[k])}, recorded ${JSON.stringify(want[k])}`)).toEqual([]);
  });

  it('the record holds numbers, not only errors', () => {
    const numbers = Object.values(want).flat(2).filter((v) => /^[0-9a-f]{16}$/.test(v as string)).length;
    expect(numbers).toBeGreaterThan(300);
  });
});
