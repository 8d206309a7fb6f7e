/**
 * The embedded formula engine: a HyperFormula instance that knows every Mixgap cell function.
 *
 * Wiring only. What each function accepts comes from the custom-functions metadata
 * (functions.json, generated from the JSDoc tags at build time); what it computes comes from the
 * very implementations the Excel build associates with those ids. Nothing here knows thermodynamics.
 */
import {
  ArraySize,
  CellError,
  EmptyValue,
  ErrorType,
  FunctionArgumentType,
  FunctionPlugin,
  HyperFormula,
  SimpleRangeValue,
} from 'hyperformula';
import type { ConfigParams, FunctionArgument, FunctionMetadata, ImplementedFunctions, SerializedNamedExpression, Sheets } from 'hyperformula';
import { CellFailure } from '../functions/errors';
import { indexDependencyGraph } from './engine-graph-index';

/** Prefix of every Mixgap function name in a formula, as in Excel (`=MIXGAP.GAPLOW(...)`). */
export const NAMESPACE = 'MIXGAP';

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

/** The value of an argument written as a literal in the formula text; undefined when computed. */
export type LiteralArg = number | string | boolean | undefined;

/** Size of a spilled result, or why it cannot be known from the formula text. */
export type SpillShapeResult = { rows: number; cols: number } | { error: string };

/** Signature of `spillShape` in src/functions/shapes.ts. */
export type SpillShape = (id: string, literalArgs: LiteralArg[]) => SpillShapeResult;

// HyperFormula does not export its AST and interpreter-state types: the few fields we read.
interface AstNode {
  type: string;
  value?: unknown;
  expression?: AstNode;
  procedureName?: string;
  expressionName?: string;
  args?: AstNode[];
}
interface ProcedureAst extends AstNode {
  procedureName: string;
  args: AstNode[];
}
type InterpreterState = unknown;

type CellValue = number | string | boolean | CellError | typeof EmptyValue;

const errorTypeOf: Record<string, ErrorType> = {
  '#N/A': ErrorType.NA,
  '#NUM!': ErrorType.NUM,
  '#VALUE!': ErrorType.VALUE,
};

/** A CellFailure from src/functions/errors.ts (by class, or by shape should two copies be bundled). */
function isCellFailure(x: unknown): x is CellFailure {
  if (x instanceof CellFailure) return true;
  const o = x as { name?: unknown; code?: unknown; message?: unknown } | null;
  return typeof o === 'object' && o !== null && o.name === 'CellFailure' && typeof o.code === 'string'
    && typeof o.message === 'string';
}

/** CellFailure -> the engine's error object, keeping the message that says what to fix. */
export function toCellError(failure: CellFailure): CellError {
  return new CellError(errorTypeOf[failure.code] ?? ErrorType.VALUE, failure.message);
}

function internalError(name: string, what: unknown): CellError {
  const text = what instanceof Error ? what.message : String(what);
  return new CellError(ErrorType.VALUE, `internal error in ${name}: ${text}`);
}

/** The value of a literal argument (`3`, `-2.5`, `"text"`, `TRUE`, `TRUE()`, `(4)`, `50%`); undefined otherwise. */
export function literalValue(ast: AstNode): LiteralArg {
  switch (ast.type) {
    case 'NUMBER':
      return ast.value as number;
    case 'STRING':
      return ast.value as string;
    case 'PARENTHESES':
      return ast.expression ? literalValue(ast.expression) : undefined;
    case 'MINUS_UNARY_OP':
    case 'PLUS_UNARY_OP':
    case 'PERCENT_OP': {
      const inner = ast.value ? literalValue(ast.value as AstNode) : undefined;
      if (typeof inner !== 'number') return undefined;
      return ast.type === 'MINUS_UNARY_OP' ? -inner : ast.type === 'PERCENT_OP' ? inner / 100 : inner;
    }
    case 'NAMED_EXPRESSION': {
      const name = ast.expressionName?.toUpperCase();
      return name === 'TRUE' || name === 'FALSE' ? name === 'TRUE' : undefined;
    }
    case 'FUNCTION_CALL':
      if ((ast.args?.length ?? 0) === 0 && (ast.procedureName === 'TRUE' || ast.procedureName === 'FALSE')) {
        return ast.procedureName === 'TRUE';
      }
      return undefined;
    default:
      return undefined;
  }
}

/** A number, text or boolean as HyperFormula hands it over (numbers may carry a format). */
function rawScalar(v: unknown): unknown {
  if (typeof v === 'object' && v !== null && !(v instanceof CellError) && typeof (v as { val?: unknown }).val === 'number') {
    return (v as { val: number }).val;
  }
  return v;
}

/** A range or scalar argument as the 2-D array a `matrix` parameter receives (empty cells: null). */
function toMatrix(v: unknown): unknown[][] | CellError {
  const rows: unknown[][] = v instanceof SimpleRangeValue ? v.rawData() : [[v]];
  const out: unknown[][] = [];
  for (const row of rows) {
    const outRow: unknown[] = [];
    for (const cell of row) {
      if (cell instanceof CellError) return cell; // an error in the input propagates, as for scalars
      outRow.push(cell === EmptyValue || cell === undefined ? null : rawScalar(cell));
    }
    out.push(outRow);
  }
  return out;
}

/** One returned cell -> engine value. */
function toCellValue(name: string, v: unknown): CellValue {
  if (typeof v === 'number') {
    return Number.isFinite(v) ? v : new CellError(ErrorType.NUM, `internal error in ${name}: result is ${v}`);
  }
  if (typeof v === 'string' || typeof v === 'boolean') return v;
  if (v === null || v === undefined) return EmptyValue;
  if (isCellFailure(v)) return toCellError(v);
  if (v instanceof CellError) return v;
  return internalError(name, `unexpected cell value of type ${typeof v}`);
}

function argumentType(p: ParameterMetadata): FunctionArgumentType {
  if (p.dimensionality === 'matrix') return FunctionArgumentType.ANY; // scalar or range
  switch (p.type) {
    case 'number':
      // Passed as it is (not coerced by the engine), so that the function itself says what is
      // wrong with a text or TRUE/FALSE given for a number (Excel itself stops such a call with a
      // bare #VALUE!; here the cell gets the message that names the argument).
      return FunctionArgumentType.NOERROR;
    case 'string':
      return FunctionArgumentType.STRING;
    case 'boolean':
      return FunctionArgumentType.BOOLEAN;
    default:
      return FunctionArgumentType.NOERROR; // `any` scalar: number, text or boolean; errors propagate
  }
}

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
};

/** What an engine starts with, loaded in one go (no undo history, one evaluation). */
export interface EngineContent {
  /** Sheets by name, each as rows of cells (values, or formula texts starting with "="). */
  sheets: Sheets;
  /** Named expressions (a `scope` is the index of a sheet in `sheets`). */
  names?: SerializedNamedExpression[];
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
  const byId = new Map<string, (...args: unknown[]) => unknown>();
  for (const [exportName, value] of Object.entries(implementations)) {
    if (typeof value === 'function') byId.set(exportName.toUpperCase(), value as (...args: unknown[]) => unknown);
  }

  const entries: Entry[] = metadata.functions.map((meta) => {
    const formulaName = `${NAMESPACE}.${meta.name}`.toUpperCase();
    const entry: Entry = {
      meta,
      formulaName,
      implementation: byId.get(meta.id.toUpperCase()),
      spills: meta.result?.dimensionality === 'matrix',
    };
    if (!entry.implementation) entry.unsupported = `no implementation exported for id ${meta.id}`;
    else if (meta.parameters.some((p) => p.repeating)) entry.unsupported = 'repeating parameters are not supported by the embedded engine';
    else if (meta.options?.stream) entry.unsupported = 'streaming functions are not supported by the embedded engine';
    return entry;
  });

  const implemented: ImplementedFunctions = {};

  class MixgapPlugin extends FunctionPlugin {
    static override implementedFunctions = implemented;

    /** Array size of a call, from the literal arguments in the formula text. */
    spillSize(entry: Entry, ast: ProcedureAst, _state: InterpreterState): ArraySize {
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
      const params = entry.meta.parameters;
      const emptyArg = ast.args.map((a) => a.type === 'EMPTY');
      const run = this.runFunction as unknown as (
        args: AstNode[], state: InterpreterState, metadata: FunctionMetadata, impl: (...a: unknown[]) => unknown,
      ) => unknown;
      return run(ast.args, state, this.metadata(name), (...values: unknown[]) => {
        const args: unknown[] = [];
        for (let i = 0; i < params.length; i++) {
          const p = params[i];
          let v = values[i];
          if (v === undefined || (p.optional && emptyArg[i])) {
            args.push(undefined); // omitted optional argument
            continue;
          }
          if (emptyArg[i]) {
            args.push(null); // an omitted required argument is an empty cell, not 0: the function says so
            continue;
          }
          if (p.dimensionality === 'matrix') {
            v = toMatrix(v);
            if (v instanceof CellError) return v;
          } else if (v === EmptyValue) {
            v = null;
          }
          args.push(v);
        }
        if (entry.meta.options?.requiresAddress || entry.meta.options?.cancelable) {
          args.push({ functionName: name, address: undefined, onCanceled: undefined });
        }
        let result: unknown;
        try {
          result = entry.implementation!(...args);
        } catch (e) {
          return isCellFailure(e) ? toCellError(e) : internalError(name, e);
        }
        return shape ? toRange(name, result, shape as { rows: number; cols: number }) : toScalar(name, result);
      });
    }
  }

  function shapeOf(entry: Entry, ast: ProcedureAst): SpillShapeResult {
    if (!entry.spills || entry.unsupported) return { rows: 1, cols: 1 };
    let shape: SpillShapeResult;
    try {
      shape = spillShape(entry.meta.id, ast.args.map(literalValue));
    } catch (e) {
      return { error: internalError(entry.formulaName, e).message! };
    }
    if ('error' in shape) return shape;
    const ok = (n: unknown) => Number.isInteger(n) && (n as number) >= 1;
    if (!ok(shape.rows) || !ok(shape.cols)) {
      return { error: `internal error in ${entry.formulaName}: spill size ${shape.rows}x${shape.cols} is not positive whole numbers` };
    }
    return shape;
  }

  function toScalar(name: string, result: unknown): unknown {
    if (Array.isArray(result)) return internalError(name, 'returned an array, but its metadata declares a scalar result');
    if (result instanceof Promise) return internalError(name, 'returned a promise: asynchronous functions are not supported by the embedded engine');
    return toCellValue(name, result);
  }

  function toRange(name: string, result: unknown, shape: { rows: number; cols: number }): unknown {
    if (!Array.isArray(result) || !result.every(Array.isArray)) {
      // A 2-D result may still be a single failure (returned rather than thrown).
      return isCellFailure(result) ? toCellError(result) : internalError(name, 'expected a 2-D array result');
    }
    const rows = result as unknown[][];
    const width = Math.max(0, ...rows.map((r) => r.length));
    if (rows.length > shape.rows || width > shape.cols) {
      return internalError(name, `returned ${rows.length}x${width} cells but the formula text promised ${shape.rows}x${shape.cols}`);
    }
    // Shorter or ragged results are padded with empty cells up to the promised size.
    const data: CellValue[][] = [];
    for (let r = 0; r < shape.rows; r++) {
      const row: CellValue[] = [];
      for (let c = 0; c < shape.cols; c++) row.push(toCellValue(name, rows[r]?.[c]));
      data.push(row);
    }
    if (shape.rows === 1 && shape.cols === 1) return data[0][0];
    return SimpleRangeValue.onlyValues(data as never);
  }

  const translations: Record<string, string> = {};
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
      (MixgapPlugin.prototype as unknown as Record<string, unknown>)[fm.sizeOfResultArrayMethod] = function (
        this: MixgapPlugin, ast: ProcedureAst, state: InterpreterState,
      ) {
        return this.spillSize(entry, ast, state);
      };
    }
    if (entry.unsupported) fm.parameters = undefined; // any arguments: always reports why it cannot run
    (MixgapPlugin.prototype as unknown as Record<string, unknown>)[method] = function (
      this: MixgapPlugin, ast: ProcedureAst, state: InterpreterState,
    ) {
      return this.call(entry, ast, state);
    };
    implemented[entry.formulaName] = fm;
    translations[entry.formulaName] = entry.formulaName;
  });

  // Function names live in the (global) language package; the plugin itself is per engine.
  HyperFormula.getLanguage(config.language ?? 'enGB').extendFunctions(translations);
  indexDependencyGraph(); // loading N formulas that read one card: linear, not quadratic, time
  const fullConfig = {
    ...ENGINE_DEFAULTS,
    ...config,
    functionPlugins: [...HyperFormula.getAllFunctionPlugins(), MixgapPlugin],
  };
  // HyperFormula knows only TRUE() and FALSE(); these names let formulas write TRUE and FALSE as in Excel.
  const booleans: SerializedNamedExpression[] = [{ name: 'TRUE', expression: '=TRUE()' }, { name: 'FALSE', expression: '=FALSE()' }];
  return HyperFormula.buildFromSheets(content?.sheets ?? {}, fullConfig, [...booleans, ...(content?.names ?? [])]);
}
