// d3-polygon 3.0.1 ships no type declarations; this covers the one function the tests use.
declare module 'd3-polygon' {
  /** Convex hull of the points (Andrew's monotone chain), or null for fewer than three points. */
  export function polygonHull<P extends [number, number]>(points: readonly P[]): P[] | null;
}
