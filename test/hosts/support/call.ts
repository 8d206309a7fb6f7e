/** Calls a cell function as a host would and gives back its value or the error code it threw. */
export function call(fn: (...a: any[]) => unknown, ...args: unknown[]): unknown {
  try {
    return fn(...args);
  } catch (e) {
    const code = (e as { code?: string }).code;
    if (code) return { error: code };
    throw e;
  }
}
