/** Whether a value rounds to the number shown: within half a unit of its last printed digit. */
export function agrees(value: unknown, shown: string): boolean {
  if (typeof value !== 'number') return false;
  const n = Number(shown);
  const digits = shown.replace(/^-/, '').replace(/e.*$/, '').replace('.', '').replace(/^0+/, '').length;
  const tolerance = n === 0 ? 0 : 0.5 * 10 ** (Math.floor(Math.log10(Math.abs(n))) - digits + 1) * 1.0000001;
  return Math.abs(value - n) <= tolerance;
}
