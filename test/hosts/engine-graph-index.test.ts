/**
 * The dependency-graph index (src/hosts/engine-graph-index.ts) changes only how fast an engine
 * finds an edge, never which cells recompute: a cell that 200 formulas read (more than the length
 * at which the index starts) is changed, dependencies are removed and added again, and every
 * formula must show the value its text gives. Expected values are the formulas' arithmetic
 * (common practice, no published source: a spreadsheet recomputes what depends on a changed cell).
 */
import { HyperFormula } from 'hyperformula';
import { describe, expect, test } from 'vitest';
import { indexGraphOf } from '../../src/hosts/engine-graph-index';

/** Patches the graph class as the engine's plugin does, from the graph of an engine (here an empty one built for it). */
function indexDependencyGraph(): boolean {
  const probe = HyperFormula.buildEmpty({ licenseKey: 'gpl-v3' });
  const graph = (probe as unknown as { dependencyGraph?: { graph?: unknown } }).dependencyGraph?.graph;
  probe.destroy();
  return indexGraphOf(graph);
}

const N = 200;

describe('dependency-graph index', () => {
  test('is in place for this HyperFormula', () => {
    expect(indexDependencyGraph()).toBe(true);
  });

  test('many formulas reading one cell recompute exactly when they should', () => {
    indexDependencyGraph();
    const column = Array.from({ length: N }, (_, i) => [`=$A$1*${i + 1}`]);
    const hf = HyperFormula.buildFromSheets({ S: [[2]] }, { licenseKey: 'gpl-v3' });
    const s = hf.getSheetId('S')!;
    hf.setCellContents({ sheet: s, row: 0, col: 1 }, column);
    const b = (i: number) => hf.getCellValue({ sheet: s, row: i, col: 1 });
    expect(b(N - 1)).toBe(2 * N);

    hf.setCellContents({ sheet: s, row: 0, col: 0 }, [[3]]);
    for (let i = 0; i < N; i++) expect(b(i)).toBe(3 * (i + 1));

    // B50 stops reading A1: a change of A1 leaves it alone.
    hf.setCellContents({ sheet: s, row: 49, col: 1 }, [['=5']]);
    hf.setCellContents({ sheet: s, row: 0, col: 0 }, [[4]]);
    expect(b(49)).toBe(5);
    expect(b(50)).toBe(4 * 51);

    // ... and reads it again: the removed edge can be added back.
    hf.setCellContents({ sheet: s, row: 49, col: 1 }, [['=$A$1+1']]);
    hf.setCellContents({ sheet: s, row: 0, col: 0 }, [[6]]);
    expect(b(49)).toBe(7);

    // Removing a formula cell (its node) and the rows around it keeps the rest right.
    hf.removeRows(s, [10, 5]);
    hf.setCellContents({ sheet: s, row: 0, col: 0 }, [[1]]);
    expect(b(9)).toBe(10);
    expect(b(10)).toBe(16); // the formula of row 16 moved up to row 11
    expect(b(N - 6)).toBe(N);
    hf.destroy();
  });
});
