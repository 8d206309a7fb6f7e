/**
 * The rule of `-o` shared by `mixgap calc` and `mixgap diagram` (README, "-o FOLDER/"): a path
 * ending in a separator, or an existing folder, is a folder; anything else is the output itself.
 */
import { mkdtempSync, writeFileSync } from 'fs';
import os from 'os';
import path from 'path';
import { describe, expect, test } from 'vitest';
import { isFolderPath } from '../../src/hosts/output-path';

describe('isFolderPath', () => {
  const dir = mkdtempSync(path.join(os.tmpdir(), 'mixgap-output-'));
  writeFileSync(path.join(dir, 'existing.xlsx'), '');

  test('a trailing separator means a folder, whether it exists or not', () => {
    expect(isFolderPath('out/demo/')).toBe(true);
    expect(isFolderPath('out\\demo\\')).toBe(true);
    expect(isFolderPath(path.join(dir, 'not-yet') + '/')).toBe(true);
  });

  test('an existing folder without the separator is a folder', () => {
    expect(isFolderPath(dir)).toBe(true);
  });

  test('an existing file, or a path that does not exist, is the output itself', () => {
    expect(isFolderPath(path.join(dir, 'existing.xlsx'))).toBe(false);
    expect(isFolderPath(path.join(dir, 'not-yet'))).toBe(false);
  });
});
