/**
 * Argument conversion between the engine and the cell functions: how each parameter of the
 * metadata is declared to the engine, and how the engine's values become what Excel would pass
 * (numbers, texts, booleans, 2-D arrays with empty cells as null, undefined for an omitted optional).
 */
import { CellError, EmptyValue, FunctionArgumentType, SimpleRangeValue } from 'hyperformula';
import type { ParameterMetadata } from './engine';

// HyperFormula does not export its AST types: the few fields we read.
export interface AstNode {
  type: string;
  value?: unknown;
  expression?: AstNode;
  procedureName?: string;
  expressionName?: string;
  args?: AstNode[];
}

import type { LiteralArg } from '../functions/shapes';

/** The value of an argument written as a literal in the formula text; undefined when computed. */
export type { LiteralArg };

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
export function toMatrix(v: unknown): unknown[][] | CellError {
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

/** How the engine is told to hand over a parameter. */
export function argumentType(p: ParameterMetadata): FunctionArgumentType {
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

/**
 * The arguments of one call as the implementation receives them, from the engine's values
 * (`values`) and which arguments the formula left empty (`F(1,)`); an error in a matrix argument
 * is returned instead.
 */
export function callArguments(params: ParameterMetadata[], values: unknown[], emptyArg: boolean[]): unknown[] | CellError {
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
  return args;
}
