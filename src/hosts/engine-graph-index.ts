/**
 * A workaround for one cost of HyperFormula 3.5's dependency graph: before adding an edge it
 * searches the node's whole list of dependents (`Array.includes`), so a cell or range that N
 * formulas read (a parameter card, in every Mixgap workbook) costs N^2/2 comparisons to load:
 * 100,000 formulas reading one card spent about 22 s there, against about 1 s for 25,000.
 *
 * The patch keeps, beside each long list of dependents, a Set of the same ids, and answers "is this
 * edge there already?" from it. Every method that changes the lists keeps the Set in step (adding,
 * removing an edge, removing a node); node ids are never reused by the graph, so an id of a removed
 * node left in a Set is never asked about again. Results are the same as without the patch (the
 * engine tests and the workbook tests run with it); only the time changes. If the graph class is not
 * what this was written for (another HyperFormula version), nothing is patched.
 */
/** Lists shorter than this are searched as they are (a Set costs more than it saves there). */
const INDEX_FROM = 32;

interface GraphLike {
  edgesSparseArray: Array<Array<number | undefined> | undefined>;
  getNodeIdIfNotNumber(node: unknown): number | undefined;
}
type Method = (this: GraphLike, ...args: unknown[]) => unknown;

const indexes = new WeakMap<GraphLike, Map<number, Set<number>>>();
let patched = false;

/** The Set of dependents of `fromId`, built when its list has grown long; undefined while short. */
function indexOf(graph: GraphLike, fromId: number): Set<number> | undefined {
  let byNode = indexes.get(graph);
  const list = graph.edgesSparseArray[fromId];
  if (!list) return undefined;
  let set = byNode?.get(fromId);
  if (set || list.length < INDEX_FROM) return set;
  if (!byNode) indexes.set(graph, (byNode = new Map()));
  set = new Set<number>();
  for (const id of list) if (id !== undefined) set.add(id);
  byNode.set(fromId, set);
  return set;
}

/** Patches the class of `graph` (a graph of an engine being built) once per process; true when it is patched. */
export function indexGraphOf(graph: unknown): boolean {
  return patched || patchGraphClass(graph as GraphLike | undefined);
}

function patchGraphClass(graph: GraphLike | undefined): boolean {
  const proto = graph && (Object.getPrototypeOf(graph) as Record<string, Method>);
  const names = ['addEdge', 'existsEdge', 'removeEdge', 'removeEdgeIfExists', 'removeNode', 'getNodeIdIfNotNumber'];
  if (!proto || !Array.isArray(graph.edgesSparseArray) || !names.every((n) => typeof proto[n] === 'function')) return false;

  const original = Object.fromEntries(names.map((n) => [n, proto[n]])) as Record<string, Method>;
  proto.addEdge = function (this: GraphLike, fromNode: unknown, toNode: unknown) {
    const fromId = this.getNodeIdIfNotNumber(fromNode);
    const toId = this.getNodeIdIfNotNumber(toNode);
    const set = fromId === undefined || toId === undefined ? undefined : indexOf(this, fromId);
    if (!set) {
      original.addEdge.call(this, fromNode, toNode);
      if (fromId !== undefined && toId !== undefined) indexOf(this, fromId); // start the index once the list is long
      return;
    }
    if (set.has(toId!)) return;
    this.edgesSparseArray[fromId!]!.push(toId);
    set.add(toId!);
  };
  proto.existsEdge = function (this: GraphLike, fromNode: unknown, toNode: unknown) {
    const fromId = (fromNode as { idInGraph?: number }).idInGraph;
    const toId = (toNode as { idInGraph?: number }).idInGraph;
    const set = fromId === undefined ? undefined : indexes.get(this)?.get(fromId);
    return set && toId !== undefined ? set.has(toId) : original.existsEdge.call(this, fromNode, toNode);
  };
  for (const name of ['removeEdge', 'removeEdgeIfExists']) {
    proto[name] = function (this: GraphLike, fromNode: unknown, toNode: unknown) {
      const result = original[name].call(this, fromNode, toNode);
      const fromId = this.getNodeIdIfNotNumber(fromNode);
      const toId = this.getNodeIdIfNotNumber(toNode);
      if (fromId !== undefined && toId !== undefined) indexes.get(this)?.get(fromId)?.delete(toId);
      return result;
    };
  }
  proto.removeNode = function (this: GraphLike, node: unknown) {
    const id = (node as { idInGraph?: number }).idInGraph;
    const result = original.removeNode.call(this, node);
    if (id !== undefined) indexes.get(this)?.delete(id);
    return result;
  };
  patched = true;
  return true;
}
