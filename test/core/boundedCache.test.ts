import { describe, expect, it } from 'vitest';
import { BoundedCache } from '../../src/core/boundedCache';

// Behaviour of the one bounded cache the systems and the solve states share (no outside source:
// the rules are our own: least recently used out first, failures not kept).
describe('BoundedCache', () => {
  it('makes a value once and answers it again', () => {
    const cache = new BoundedCache<number>(3);
    let made = 0;
    const make = () => ++made;
    expect(cache.get('a', make)).toBe(1);
    expect(cache.get('a', make)).toBe(1);
    expect(cache.get('b', make)).toBe(2);
    expect(cache.get('a', make)).toBe(1);
    expect(made).toBe(2);
  });

  it('holds at most its capacity, the least recently used out first', () => {
    const cache = new BoundedCache<string>(2);
    cache.get('a', () => 'A');
    cache.get('b', () => 'B');
    cache.get('a', () => 'A again'); // a is now the most recently used
    cache.get('c', () => 'C'); // b goes
    expect(cache.size).toBe(2);
    expect(cache.get('a', () => 'made')).toBe('A');
    expect(cache.get('b', () => 'made')).toBe('made');
  });

  it('keeps nothing of a make that throws', () => {
    const cache = new BoundedCache<number>(2);
    expect(() => cache.get('bad', () => { throw new Error('no'); })).toThrow('no');
    expect(cache.size).toBe(0);
    expect(cache.get('bad', () => 7)).toBe(7);
  });

  it('forgets everything on clear, also the key asked for last', () => {
    const cache = new BoundedCache<number>(2);
    cache.get('a', () => 1);
    cache.clear();
    expect(cache.get('a', () => 2)).toBe(2);
  });
});
