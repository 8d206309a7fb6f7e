import path from 'path';
import { generateCustomFunctionsMetadata } from 'custom-functions-metadata';
import { expect } from 'vitest';
import type { CustomFunctionsMetadata } from '../../../src/hosts/engine';
import { evaluateFormulas } from '../../../src/hosts/evaluate';
import { buildMixgapEngine } from '../../../src/hosts/mixgap-engine';

/** Formula texts evaluated in a fresh embedded engine built from the build's metadata, then destroyed. */
export function evaluateIn(metadata: CustomFunctionsMetadata, formulas: string[]) {
  const engine = buildMixgapEngine(metadata);
  try {
    return evaluateFormulas(engine, formulas);
  } finally {
    engine.destroy();
  }
}

let generated: Promise<CustomFunctionsMetadata> | undefined;

/**
 * functions.json as the build generates it from the JSDoc tags of the files in
 * src/functions/sources.js (generated once per test file; the generator must report no errors).
 */
export function generatedMetadata(): Promise<CustomFunctionsMetadata> {
  generated ??= (async () => {
    const root = path.join(__dirname, '..', '..', '..');
    // eslint-disable-next-line @typescript-eslint/no-require-imports
    const sources: string[] = require(path.join(root, 'src', 'functions', 'sources.js')).map((f: string) => path.join(root, 'src', 'functions', f));
    const result = await generateCustomFunctionsMetadata(sources, false);
    expect(result.errors).toEqual([]);
    return JSON.parse(result.metadataJson) as CustomFunctionsMetadata;
  })();
  return generated;
}

/** A card or table as an inline array typed into a formula: {"model","rk";"AB.L0",12000;...}. */
export const inlineArray = (rows: ReadonlyArray<ReadonlyArray<unknown>>): string =>
  `{${rows.map((row) => row.map((v) => (typeof v === 'string' ? `"${v}"` : String(v))).join(',')).join(';')}}`;
