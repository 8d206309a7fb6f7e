/**
 * The engine with the real Mixgap functions: the implementations and spill sizes the Excel build
 * uses, described by the functions.json that the build generated from their JSDoc tags.
 */
import type { ConfigParams, HyperFormula } from 'hyperformula';
import * as fns from '../functions/index';
import { spillShape } from '../functions/shapes';
import { buildEngine } from './engine';
import type { CustomFunctionsMetadata, EngineContent } from './engine';

/** The engine with the real functions; with `content`, built from those sheets and names at once. */
export function buildMixgapEngine(metadata: CustomFunctionsMetadata, config: Partial<ConfigParams> = {}, content?: EngineContent): HyperFormula {
  return buildEngine(metadata, fns as Record<string, unknown>, spillShape, config, content);
}
