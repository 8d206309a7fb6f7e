/**
 * A remembered value per text key, at most `capacity` of them, the least recently used out first.
 * The key asked for last is answered without touching the map: a filled column of formulas asks
 * for the same key again and again. Used for the systems read from parameter cells (functions
 * layer) and for each model's solve state (src/core/equilibrium.ts).
 */
export class BoundedCache<V> {
  private readonly map = new Map<string, V>();
  private lastKey: string | undefined;
  private lastValue: V | undefined;

  constructor(readonly capacity: number) {}

  /** The value under `key`; when there is none, `make()`'s, remembered (a `make` that throws leaves nothing behind). */
  get(key: string, make: () => V): V {
    if (key === this.lastKey) return this.lastValue as V;
    let value = this.map.get(key);
    if (value !== undefined) {
      this.map.delete(key); // set again below: now the most recently used
    } else {
      value = make();
      if (this.map.size >= this.capacity) this.map.delete(this.map.keys().next().value as string);
    }
    this.map.set(key, value);
    this.lastKey = key;
    this.lastValue = value;
    return value;
  }

  get size(): number {
    return this.map.size;
  }

  clear(): void {
    this.map.clear();
    this.lastKey = undefined;
    this.lastValue = undefined;
  }
}
