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
