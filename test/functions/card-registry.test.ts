/**
 * The model-family registry (src/core/models/index.ts) is what parameter cards, the README's card
 * table and the help pages are made from: every family's keys are read as that family's keys, the
 * README table lists exactly the registry's rows, and the built help pages carry them.
 */
import { TERNARY_FAMILIES } from '../../src/core/ternary/families';
import { existsSync, readFileSync } from 'fs';
import path from 'path';
import { describe, expect, it } from 'vitest';
import type { ModelFamily } from '../../src/core/family';
import { FAMILIES, familyNamed } from '../../src/core/models';
import { checkCard, gapLow } from '../../src/functions/functions';
import { failure } from './support/failure';

const root = path.join(__dirname, '..', '..');

/** A README table row for one registry row, as the README writes it. */
const readmeKeys = (keys: readonly string[]) => keys.map((k) => (k === '...' ? '...' : `\`${k}\``)).join(', ');
const modelNames = (families: readonly ModelFamily[]) =>
  families.map((f) => `\`${f.name}\`${f.aliases.length ? ` (or ${f.aliases.map((a) => `\`${a}\``).join(', ')})` : ''}`).join(', ');

describe('the model-family registry', () => {
  it('names every family once, and each name and alias finds its family', () => {
    const names = FAMILIES.flatMap((f) => [f.name, ...f.aliases]);
    expect(new Set(names).size).toBe(names.length);
    for (const f of FAMILIES) {
      for (const n of [f.name, ...f.aliases]) expect(familyNamed(n.toUpperCase())).toBe(f);
    }
  });

  it("every family's keys are read as its own: on another family's card they are refused naming the owner", () => {
    for (const owner of FAMILIES) {
      const other = FAMILIES.find((f) => f !== owner)!;
      for (const key of owner.keys) {
        const e = failure(() => gapLow(300, [['model', other.name], [key, 1]] as any));
        expect(e.code).toBe('#VALUE!');
        expect(e.message).toContain(`"${key}" belongs to a ${owner.name} card, not to this ${other.name} card`);
      }
    }
  });

  it('an unknown model is answered with every family of the registry', () => {
    const e = failure(() => gapLow(300, [['model', 'ideal'], ['omega', 1]] as any));
    for (const f of FAMILIES) expect(e.message).toContain(f.name);
  });

  it('CHECKCARD names the composition variable the family declares', () => {
    const fh = checkCard([['model', 'fh'], ['NA', 1], ['NB', 10], ['chi.B', 300], ['name B', 'polymer']] as any);
    expect(FAMILIES.find((f) => f.name === 'flory-huggins')!.composition).toBe('volume fraction');
    expect(fh).toContain('composition = volume fraction of polymer');
    expect(checkCard([['model', 'regular'], ['omega', 20000]] as any)).not.toContain('composition =');
  });
});

describe('the README card table is the registry', () => {
  const readme = readFileSync(path.join(root, 'README.md'), 'utf8');
  const section = readme.slice(readme.indexOf('### Parameter cards'));
  const lines = section.split('\n');
  const first = lines.findIndex((l) => l.startsWith('|'));
  const end = lines.findIndex((l, i) => i > first && !l.startsWith('|'));
  // the table's rows after its header and rule, as cells
  const rows = lines.slice(first + 2, end).map((l) => l.split('|').slice(1, -1).map((c) => c.trim()));

  it('its model row lists every family and alias', () => {
    expect(rows[0]).toEqual(['`model`', 'all', modelNames(FAMILIES)]);
  });

  it('its family rows are the key rows of each family, in registry order', () => {
    const familyRows = rows.filter((r) => r[1] !== 'all');
    const want = FAMILIES.flatMap((f) => f.keyRows.map((r) => [readmeKeys(r.keys), f.name, r.meaning]));
    expect(familyRows).toEqual(want);
  });
});

describe('the help pages carry the registry', () => {
  const index = path.join(root, 'dist', 'help', 'index.html');
  it.runIf(existsSync(index))('every key row of every family, binary and ternary, is a row of a card table', () => {
    // the page's text without tags (the build minifies its HTML); subscripts lose their mark-up
    // cells start with '|'
    const text = readFileSync(index, 'utf8').replace(/<t[dhr]\b[^>]*>/g, '|').replace(/<[^>]*>/g, '').replace(/&#39;|&apos;/g, "'");
    for (const f of [...FAMILIES, ...TERNARY_FAMILIES]) {
      for (const r of f.keyRows) {
        const keys = r.keys.map((k) => (k === '...' ? '…' : k)).join(', ');
        expect(text).toContain(`|${keys}|${f.name}|${r.meaning.replace(/_/g, '')}`);
      }
    }
  });
});
