/**
 * The real cell functions as the hosts see them: the metadata generated from the JSDoc tags of
 * the files listed in src/functions/sources.js, the exports the engine looks up by id, and the engine built from both.
 */
import { existsSync, readFileSync } from 'fs';
import path from 'path';
import { beforeAll, describe, expect, test } from 'vitest';
import { generateCustomFunctionsMetadata } from 'custom-functions-metadata';
import type { IGenerateResult } from 'custom-functions-metadata';
import * as fns from '../../src/functions/index';
import { buildMixgapEngine } from '../../src/hosts/mixgap-engine';
import type { CustomFunctionsMetadata } from '../../src/hosts/engine';

const root = path.join(__dirname, '..', '..');
// eslint-disable-next-line @typescript-eslint/no-require-imports
const source: string[] = require('../../src/functions/sources.js').map((f: string) => path.join(root, 'src', 'functions', f));
let generated: IGenerateResult;
let metadata: CustomFunctionsMetadata;

beforeAll(async () => {
  generated = await generateCustomFunctionsMetadata(source, false);
  metadata = JSON.parse(generated.metadataJson);
});

describe('cell function metadata', () => {
  test('the generator reports no errors', () => {
    expect(generated.errors).toEqual([]);
    expect(metadata.functions.length).toBeGreaterThan(0);
  });

  test('each id is the name of an exported function, upper-cased', () => {
    const exported = Object.entries(fns).filter(([, v]) => typeof v === 'function').map(([k]) => k);
    for (const a of generated.associate) {
      expect(a.id).toBe(a.functionName.toUpperCase());
      expect(exported, `${a.functionName} is associated but not exported`).toContain(a.functionName);
    }
    expect(generated.associate.map((a) => a.id).sort()).toEqual(metadata.functions.map((f) => f.id).sort());
  });

  test('the built dist/functions.json is what the generator gives for the current source', () => {
    const built = path.join(root, 'dist', 'functions.json');
    expect(existsSync(built), 'run `npm run build`').toBe(true);
    expect(JSON.parse(readFileSync(built, 'utf8'))).toEqual(metadata);
  });
});

describe('the engine with the real functions', () => {
  test('registers every function as MIXGAP.<name>, each with an implementation', () => {
    const engine = buildMixgapEngine(metadata);
    const registered = engine.getRegisteredFunctionNames();
    for (const f of metadata.functions) {
      expect(registered).toContain(`MIXGAP.${f.name}`);
      const sheet = engine.getSheetId(engine.addSheet())!;
      // Called with no arguments: whatever the cell shows, it must not be a missing implementation.
      engine.setCellContents({ sheet, row: 0, col: 0 }, [[`=MIXGAP.${f.name}()`]]);
      const v = engine.getCellValue({ sheet, row: 0, col: 0 }) as { message?: string };
      expect(String(v?.message ?? ''), f.name).not.toContain('no implementation');
    }
    engine.destroy();
  });
});
