/** Timing helpers shared by the bench sections (bench/run.ts and the files it calls). */

/** How a section reports a line: what was measured, the figure, the target if any. */
export type Report = (what: string, value: string, target?: string) => void;

export const median = (v: number[]) => [...v].sort((a, b) => a - b)[Math.floor(v.length / 2)];
export const fmt = (us: number) => (us < 1000 ? `${us.toFixed(2)} µs` : `${(us / 1000).toFixed(2)} ms`);

/**
 * Median time per call (µs) of `call(i)` over `batches` batches of `size` calls with distinct i,
 * after `warm` batches' worth of calls (JIT warm-up).
 */
export function perCall(call: (i: number) => unknown, batches = 40, size = 250, warm = 5): number {
  let i = 0;
  for (let w = 0; w < size * warm; w++) call(i++);
  const times: number[] = [];
  for (let b = 0; b < batches; b++) {
    const t0 = performance.now();
    for (let k = 0; k < size; k++) call(i++);
    times.push(((performance.now() - t0) * 1000) / size);
  }
  return median(times);
}

/** Median time (µs) of a whole task, run `runs` times after `warm` runs. */
export function whole(task: () => unknown, runs = 25, warm = 3): number {
  for (let w = 0; w < warm; w++) task();
  const times: number[] = [];
  for (let r = 0; r < runs; r++) {
    const t0 = performance.now();
    task();
    times.push((performance.now() - t0) * 1000);
  }
  return median(times);
}
