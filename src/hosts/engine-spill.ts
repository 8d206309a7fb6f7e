/**
 * Spill sizing: the engine must know the size of an array result before it evaluates it, from the
 * formula text. The size comes from `spillShape` (src/functions/shapes.ts) given the literal
 * arguments; a result is then fitted to that size (padded, or an internal error when larger).
 */
import { SimpleRangeValue } from 'hyperformula';
import { literalValue } from './engine-arguments';
import type { AstNode, LiteralArg } from './engine-arguments';
import { internalError, isCellFailure, toCellError, toCellValue } from './engine-errors';
import type { EngineCellValue } from './engine-errors';
import type { Shape } from '../functions/shapes';

/** Size of a spilled result, or why it cannot be known from the formula text. */
export type SpillShapeResult = Shape;

/** Signature of `spillShape` in src/functions/shapes.ts. */
export type SpillShape = (id: string, literalArgs: LiteralArg[]) => SpillShapeResult;

/** The size promised for a call of function `id` (named `formulaName`) with these argument ASTs. */
export function shapeOfCall(spillShape: SpillShape, id: string, formulaName: string, args: AstNode[]): SpillShapeResult {
  let shape: SpillShapeResult;
  try {
    shape = spillShape(id, args.map(literalValue));
  } catch (e) {
    return { error: internalError(formulaName, e).message! };
  }
  if ('error' in shape) return shape;
  const ok = (n: unknown) => Number.isInteger(n) && (n as number) >= 1;
  if (!ok(shape.rows) || !ok(shape.cols)) {
    return { error: `internal error in ${formulaName}: spill size ${shape.rows}x${shape.cols} is not positive whole numbers` };
  }
  return shape;
}

/** A 2-D result fitted to the promised size: shorter or ragged results are padded with empty cells. */
export function toRange(name: string, result: unknown, shape: { rows: number; cols: number }): unknown {
  if (!Array.isArray(result) || !result.every(Array.isArray)) {
    // A 2-D result may still be a single failure (returned rather than thrown).
    return isCellFailure(result) ? toCellError(result) : internalError(name, 'expected a 2-D array result');
  }
  const rows = result as unknown[][];
  const width = Math.max(0, ...rows.map((r) => r.length));
  if (rows.length > shape.rows || width > shape.cols) {
    return internalError(name, `returned ${rows.length}x${width} cells but the formula text promised ${shape.rows}x${shape.cols}`);
  }
  const data: EngineCellValue[][] = [];
  for (let r = 0; r < shape.rows; r++) {
    const row: EngineCellValue[] = [];
    for (let c = 0; c < shape.cols; c++) row.push(toCellValue(name, rows[r]?.[c]));
    data.push(row);
  }
  if (shape.rows === 1 && shape.cols === 1) return data[0][0];
  return SimpleRangeValue.onlyValues(data as never);
}
