/**
 * The engine of src/hosts/engine.ts patches HyperFormula's graph class itself, from its function
 * plugin, before it loads any cell (no empty engine is built to find the class). A file of its own:
 * the patch is made once per process, and nothing else here may make it first.
 */
import { expect, test } from 'vitest';
import { buildEngine } from '../../src/hosts/engine';
import { indexGraphOf } from '../../src/hosts/engine-graph-index';

test('building an engine puts the dependency-graph index in place', () => {
  // Not patched yet: with no graph to look at, nothing can be patched.
  expect(indexGraphOf(undefined)).toBe(false);
  // One function: the engine makes a plugin only for functions it has.
  const metadata = { functions: [{ id: 'ONE', name: 'ONE', parameters: [] }] };
  const engine = buildEngine(metadata, { one: () => 1 }, () => ({ rows: 1, cols: 1 }), {}, { sheets: { S: [[1, '=A1+MIXGAP.ONE()']] } });
  expect(engine.getCellValue({ sheet: 0, row: 0, col: 1 })).toBe(2);
  engine.destroy();
  expect(indexGraphOf(undefined)).toBe(true);
});
