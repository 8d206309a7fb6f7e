/**
 * The embedded formula engine: a HyperFormula instance that knows every Mixgap cell function.
 *
 * Wiring only. What each function accepts comes from the custom-functions metadata
 * (functions.json, generated from the JSDoc tags at build time); what it computes comes from the
 * very implementations the Excel build associates with those ids. Nothing here knows thermodynamics.
 * This file registers the functions (one plugin per engine); the conversions live beside it:
 * ./engine-arguments (engine values -> arguments), ./engine-errors (failures -> error values),
 * ./engine-spill (sizes of spilled results).
 */
import { CellError, ErrorType, FunctionArgumentType, FunctionPlugin, HyperFormula, ArraySize, SimpleRangeValue } from 'hyperformula';
import type { ConfigParams, FunctionArgument, FunctionMetadata, ImplementedFunctions, SerializedNamedExpression, Sheets } from 'hyperformula';
import { argumentType, callArguments } from './engine-arguments';
import type { AstNode } from './engine-arguments';
import { NAMESPACE } from '../functions/namespace';
import { callSafely, toScalar } from './engine-errors';
import { shareGroupParses } from './engine-formula-groups';
import type { FormulaGroupOf } from './engine-formula-groups';
import { indexGraphOf } from './engine-graph-index';
import { shapeOfCall, toRange } from './engine-spill';
import type { SpillShape, SpillShapeResult } from './engine-spill';

export { literalValue } from './engine-arguments';
export type { LiteralArg } from './engine-arguments';
export { toCellError } from './engine-errors';
export type { SpillShape, SpillShapeResult } from './engine-spill';

export { NAMESPACE } from '../functions/namespace';

/** One parameter as functions.json describes it. */
export interface ParameterMetadata {
  name: string;
  description?: string;
  type: string;
  dimensionality?: string;
  optional?: boolean;
  repeating?: boolean;
}

/** One function as functions.json describes it. */
export interface FunctionMetadataEntry {
  id: string;
  name: string;
  description?: string;
  parameters: ParameterMetadata[];
  result?: { type?: string; dimensionality?: string };
  options?: Record<string, boolean | undefined>;
}

/** The content of functions.json. */
export interface CustomFunctionsMetadata {
  functions: FunctionMetadataEntry[];
}

/** A module namespace (`import * as fns`): its exported functions are looked up by id. */
export type Implementations = Record<string, unknown>;

interface ProcedureAst extends AstNode {
  procedureName: string;
  args: AstNode[];
}
// HyperFormula does not export its interpreter-state type.
type InterpreterState = unknown;

interface Entry {
  meta: FunctionMetadataEntry;
  /** Name in formulas, e.g. MIXGAP.GAPLOW. */
  formulaName: string;
  implementation?: (...args: unknown[]) => unknown;
  spills: boolean;
  /** Set when the engine cannot run this function; the cell shows #VALUE! with this text. */
  unsupported?: string;
}

const ENGINE_DEFAULTS: Partial<ConfigParams> = {
  licenseKey: 'gpl-v3',
  // No rounding of results or comparisons: with smartRounding on (the default) HyperFormula rounds
  // every exported number to `precisionRounding` (10) significant digits and snaps sums to zero
  // within `precisionEpsilon`; smartRounding off disables both, so values come out bit-exact.
  smartRounding: false,
  // Ranges passed to scalar parameters are lifted over element by element, as in dynamic-array Excel.
  useArrayArithmetic: true,
  // No host undoes anything, and keeping every change for undo costs more than evaluating (most of
  // the time of `mixgap eval` on thousands of formulas, as it was of `mixgap calc`).
  undoLimit: 0,
};

/** One entry per function of the metadata, with its implementation or why the engine cannot run it. */
function entriesOf(metadata: CustomFunctionsMetadata, implementations: Implementations): Entry[] {
  const byId = new Map<string, (...args: unknown[]) => unknown>();
  for (const [exportName, value] of Object.entries(implementations)) {
    if (typeof value === 'function') byId.set(exportName.toUpperCase(), value as (...args: unknown[]) => unknown);
  }
  return metadata.functions.map((meta) => {
    const entry: Entry = {
      meta,
      formulaName: `${NAMESPACE}.${meta.name}`.toUpperCase(),
      implementation: byId.get(meta.id.toUpperCase()),
      spills: meta.result?.dimensionality === 'matrix',
    };
    if (!entry.implementation) entry.unsupported = `no implementation exported for id ${meta.id}`;
    else if (meta.parameters.some((p) => p.repeating)) entry.unsupported = 'repeating parameters are not supported by the embedded engine';
    else if (meta.options?.stream) entry.unsupported = 'streaming functions are not supported by the embedded engine';
    return entry;
  });
}

/**
 * A HyperFormula function plugin for `entries` (a new class per engine: its table of functions is
 * static), and the translations of their names.
 */
function mixgapPlugin(
  entries: Entry[],
  spillShape: SpillShape,
  onEngine?: (interpreter: unknown) => void,
): { plugin: typeof FunctionPlugin; translations: Record<string, string> } {
  const implemented: ImplementedFunctions = {};
  const shapeOf = (entry: Entry, ast: ProcedureAst): SpillShapeResult =>
    !entry.spills || entry.unsupported ? { rows: 1, cols: 1 } : shapeOfCall(spillShape, entry.meta.id, entry.formulaName, ast.args);

  class MixgapPlugin extends FunctionPlugin {
    static override implementedFunctions = implemented;

    constructor(...args: ConstructorParameters<typeof FunctionPlugin>) {
      super(...args);
      // The engine makes its plugins before it loads any cell: the graph it will fill is there now.
      // Loading N formulas that read one card then takes linear, not quadratic, time.
      indexGraphOf((this as unknown as { dependencyGraph?: { graph?: unknown } }).dependencyGraph?.graph);
      onEngine?.(args[0]);
    }

    /** Array size of a call, from the literal arguments in the formula text. */
    spillSize(entry: Entry, ast: ProcedureAst): ArraySize {
      const shape = shapeOf(entry, ast);
      return 'error' in shape ? ArraySize.scalar() : new ArraySize(shape.cols, shape.rows);
    }

    call(entry: Entry, ast: ProcedureAst, state: InterpreterState): unknown {
      const name = entry.formulaName;
      if (entry.unsupported) return new CellError(ErrorType.VALUE, `${name}: ${entry.unsupported}`);
      let shape: SpillShapeResult | undefined;
      if (entry.spills) {
        shape = shapeOf(entry, ast);
        if ('error' in shape) return new CellError(ErrorType.VALUE, shape.error);
      }
      const emptyArg = ast.args.map((a) => a.type === 'EMPTY');
      const impl = (...values: unknown[]) => {
        const args = callArguments(entry.meta.parameters, values, emptyArg);
        if (args instanceof CellError) return args;
        if (entry.meta.options?.requiresAddress || entry.meta.options?.cancelable) {
          args.push({ functionName: name, address: undefined, onCanceled: undefined });
        }
        const outcome = callSafely(name, () => entry.implementation!(...args));
        if ('error' in outcome) return outcome.error;
        return shape ? toRange(name, outcome.result, shape as { rows: number; cols: number }) : toScalar(name, outcome.result);
      };
      const metadata = this.metadata(name);
      const direct = this.direct(ast.args, state, metadata, entry.spills, emptyArg, impl);
      if (direct !== NEEDS_RUN_FUNCTION) return direct;
      const run = this.runFunction as unknown as (
        args: AstNode[], state: InterpreterState, metadata: FunctionMetadata, impl: (...a: unknown[]) => unknown,
      ) => unknown;
      return run(ast.args, state, metadata, impl);
    }

    /**
     * A call as the engine's runFunction makes it, for the common case, without the lists it builds
     * per call (a tenth of the time of a big workbook): the arguments evaluated, coerced to their
     * declared types by the engine's own coerceArgumentsToRequiredTypes, and `impl` called with them.
     * A call that needs more (a range where a scalar parameter lifts the function over it, too many
     * or too few arguments) goes to runFunction: NEEDS_RUN_FUNCTION. HyperFormula 3.5.0 internals
     * used: FunctionPlugin's evaluateAst and coerceArgumentsToRequiredTypes(state, values,
     * parameters, ignorable flags, empty flags), as runFunction calls them.
     */
    direct(args: AstNode[], state: InterpreterState, metadata: FunctionMetadata, spills: boolean, emptyArg: boolean[],
      impl: (...a: unknown[]) => unknown): unknown {
      const params = metadata.parameters;
      const self = this as unknown as {
        evaluateAst?: (ast: AstNode, state: InterpreterState) => unknown;
        coerceArgumentsToRequiredTypes?: (state: InterpreterState, values: unknown[], params: FunctionArgument[], ignorable: boolean[], empty: boolean[]) => unknown;
      };
      if (!params || metadata.repeatLastArgs !== undefined || metadata.expandRanges || args.length > params.length) return NEEDS_RUN_FUNCTION;
      if (typeof self.evaluateAst !== 'function' || typeof self.coerceArgumentsToRequiredTypes !== 'function') return NEEDS_RUN_FUNCTION;
      for (let i = args.length; i < params.length; i++) if (!params[i].optionalArg && params[i].defaultValue === undefined) return NEEDS_RUN_FUNCTION;
      const values: unknown[] = [];
      const ignorable: boolean[] = [];
      for (let i = 0; i < args.length; i++) {
        const v = self.evaluateAst(args[i], state);
        // Lifted over the range, cell by cell (vectorization), unless the function spills itself.
        if (!spills && v instanceof SimpleRangeValue && params[i].argumentType !== FunctionArgumentType.RANGE
          && params[i].argumentType !== FunctionArgumentType.ANY) return NEEDS_RUN_FUNCTION;
        values.push(v);
        ignorable.push(false);
      }
      const coerced = self.coerceArgumentsToRequiredTypes(state, values, params, ignorable, emptyArg);
      if (coerced instanceof CellError) return coerced;
      return impl(...(coerced as unknown[]));
    }
  }

  const translations: Record<string, string> = {};
  const proto = MixgapPlugin.prototype as unknown as Record<string, unknown>;
  entries.forEach((entry, i) => {
    const method = `mixgap${i}`;
    const fm: FunctionMetadata = {
      method,
      parameters: entry.meta.parameters.map((p): FunctionArgument => ({
        argumentType: argumentType(p),
        ...(p.optional ? { optionalArg: true } : {}),
      })),
      isVolatile: !!entry.meta.options?.volatile,
    };
    if (entry.spills) {
      fm.sizeOfResultArrayMethod = `${method}size`;
      fm.vectorizationForbidden = true;
      proto[fm.sizeOfResultArrayMethod] = function (this: MixgapPlugin, ast: ProcedureAst) {
        return this.spillSize(entry, ast);
      };
    }
    if (entry.unsupported) fm.parameters = undefined; // any arguments: always reports why it cannot run
    proto[method] = function (this: MixgapPlugin, ast: ProcedureAst, state: InterpreterState) {
      return this.call(entry, ast, state);
    };
    implemented[entry.formulaName] = fm;
    translations[entry.formulaName] = entry.formulaName;
  });
  return { plugin: MixgapPlugin, translations };
}

/** What MixgapPlugin.direct answers for a call it leaves to the engine's runFunction. */
const NEEDS_RUN_FUNCTION = Symbol('needs runFunction');

/** What an engine starts with, loaded in one go (no undo history, one evaluation). */
export interface EngineContent {
  /** Sheets by name, each as rows of cells (values, or formula texts starting with "="). */
  sheets: Sheets;
  /** Named expressions (a `scope` is the index of a sheet in `sheets`). */
  names?: SerializedNamedExpression[];
  /** Cells that hold one formula moved from cell to cell (./engine-formula-groups): read once per group. */
  formulaGroups?: FormulaGroupOf;
}

/**
 * Builds a HyperFormula engine with every function of `metadata` registered as `MIXGAP.<name>`,
 * computed by `implementations[<export name>]`, where the export name upper-cased is the id.
 * Functions with a matrix result get their spill size from `spillShape`, called with the literal
 * arguments of the formula text. With `content`, the engine is built from those sheets and names
 * at once (the engine's bulk path: far faster than adding cells one by one).
 */
export function buildEngine(
  metadata: CustomFunctionsMetadata,
  implementations: Implementations,
  spillShape: SpillShape,
  config: Partial<ConfigParams> = {},
  content?: EngineContent,
): HyperFormula {
  // A workbook's shared formulas are read once per block while the engine is built (./engine-formula-groups).
  let stopSharing: (() => void) | undefined;
  const groupOf = content?.formulaGroups;
  const onEngine = groupOf && ((interpreter: unknown) => { stopSharing ??= shareGroupParses(interpreter, groupOf); });
  const { plugin, translations } = mixgapPlugin(entriesOf(metadata, implementations), spillShape, onEngine);
  // Function names live in the (global) language package; the plugin itself is per engine.
  HyperFormula.getLanguage(config.language ?? 'enGB').extendFunctions(translations);
  const fullConfig = {
    ...ENGINE_DEFAULTS,
    ...config,
    functionPlugins: [...HyperFormula.getAllFunctionPlugins(), plugin],
  };
  // HyperFormula knows only TRUE() and FALSE(); these names let formulas write TRUE and FALSE as in Excel.
  const booleans: SerializedNamedExpression[] = [{ name: 'TRUE', expression: '=TRUE()' }, { name: 'FALSE', expression: '=FALSE()' }];
  try {
    return HyperFormula.buildFromSheets(content?.sheets ?? {}, fullConfig, [...booleans, ...(content?.names ?? [])]);
  } finally {
    stopSharing?.();
  }
}
