/**
 * The engine with the real Mixgap functions: the implementations and spill sizes the Excel build
 * uses, described by the functions.json that the build generated from their JSDoc tags.
 */
import type { ConfigParams, HyperFormula } from 'hyperformula';
import * as fns from '../functions/index';
import { spillShape } from '../functions/shapes';
import { buildEngine } from './engine';
import type { CustomFunctionsMetadata } from './engine';

export function buildMixgapEngine(metadata: CustomFunctionsMetadata, config: Partial<ConfigParams> = {}): HyperFormula {
  return buildEngine(metadata, fns as Record<string, unknown>, spillShape, config);
}
