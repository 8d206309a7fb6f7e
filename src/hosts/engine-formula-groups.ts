/**
 * Shared formulas read once. A file stores a filled range as one formula moved from cell to cell
 * (`MIXGAP.GAPLOW($A1,Card)` in B1, `MIXGAP.GAPLOW($A2,Card)` in B2, ...), and HyperFormula 3.5
 * reads the text of every cell anew: it tokenizes each one (a third of the time it takes to load a
 * big workbook) only to find, by a hash of the tokens in relative form, the syntax tree it already
 * has. Where the workbook says that cells hold one formula moved (a group), the parse of the first
 * cell read is given to the others: a tree in relative form (R0C0: offsets from the cell) is the
 * same for every cell of the group, and so are its relative dependencies.
 *
 * Only trees without ranges are shared (the engine orders the corners of a range by where the cell
 * is), only texts that are the very text the workbook gave for that cell (anything else, such as a
 * formula evaluated later at the same address, is read as usual), and only parses without errors.
 *
 * HyperFormula 3.5.0 internals used (not its documented API; the version is pinned in package.json):
 * the engine's parser (a ParserWithCaching, `lazilyTransformingAstService.parser` of its dependency
 * graph), its `parse(text, address)` and what that returns ({ ast, errors, hasVolatileFunction,
 * hasStructuralChangeFunction, dependencies }: dependencies relative to the cell, which the engine
 * only reads), and `convertReversedRangesToRegularRanges(ast)`, which gives each cell its own copy of
 * the tree as `parse` does. If they are not there (another version), nothing is changed.
 */
import type { SimpleCellAddress } from 'hyperformula';

/**
 * Which group of cells holding one formula moved the cell at `address` belongs to, given the text
 * the engine is reading there; undefined for none (or for a text that is not the workbook's).
 */
export type FormulaGroupOf = (address: SimpleCellAddress, text: string) => number | undefined;

interface ParseResult {
  ast: TreeNode;
  errors: unknown[];
  hasVolatileFunction: boolean;
  hasStructuralChangeFunction: boolean;
  dependencies: unknown[];
}

interface TreeNode {
  type: string;
  [field: string]: unknown;
}

interface ParserLike {
  parse(text: string, address: SimpleCellAddress): ParseResult;
  convertReversedRangesToRegularRanges(ast: TreeNode): TreeNode;
  formulaAddress?: SimpleCellAddress;
}

const RANGES = new Set(['CELL_RANGE', 'COLUMN_RANGE', 'ROW_RANGE']);

/** Whether a tree holds no range (its children: operands, arguments, rows of an inline array). */
function rangeFree(node: unknown): boolean {
  if (Array.isArray(node)) return node.every(rangeFree);
  if (typeof node !== 'object' || node === null) return true;
  const n = node as TreeNode;
  if (RANGES.has(n.type)) return false;
  for (const field of ['value', 'left', 'right', 'expression', 'args']) {
    const child = n[field];
    if (typeof child === 'object' && child !== null && !rangeFree(child)) return false;
  }
  return true;
}

/**
 * Makes the parser of an engine being built give each group's first parse to the rest of the group
 * (see above); returns the function that stops it (the engine reads as usual from then on).
 * `interpreter` is what HyperFormula gives a function plugin. Returns undefined when the parser is
 * not what this was written for.
 */
export function shareGroupParses(interpreter: unknown, groupOf: FormulaGroupOf): (() => void) | undefined {
  const parser = (interpreter as { dependencyGraph?: { lazilyTransformingAstService?: { parser?: ParserLike } } })
    .dependencyGraph?.lazilyTransformingAstService?.parser;
  if (!parser || typeof parser.parse !== 'function' || typeof parser.convertReversedRangesToRegularRanges !== 'function') return undefined;
  const original = parser.parse;
  const own = Object.prototype.hasOwnProperty.call(parser, 'parse');
  let parses: Map<number, ParseResult> | undefined = new Map();
  parser.parse = function (this: ParserLike, text: string, address: SimpleCellAddress): ParseResult {
    const group = parses && groupOf(address, text);
    if (group === undefined || !parses) return original.call(this, text, address);
    const first = parses.get(group);
    if (!first) {
      const result = original.call(this, text, address);
      if (result.errors.length === 0 && rangeFree(result.ast)) parses.set(group, result);
      return result;
    }
    this.formulaAddress = address;
    return {
      ast: this.convertReversedRangesToRegularRanges(first.ast),
      errors: [],
      hasVolatileFunction: first.hasVolatileFunction,
      hasStructuralChangeFunction: first.hasStructuralChangeFunction,
      dependencies: first.dependencies,
    };
  };
  return () => {
    parses = undefined;
    if (own) parser.parse = original;
    else delete (parser as Partial<ParserLike>).parse;
  };
}
