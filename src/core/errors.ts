/**
 * Failures of the thermodynamic core. The core knows nothing of cells: it says what went wrong
 * (`reason`) and the functions layer chooses the spreadsheet error that fits.
 *
 * A message that names a temperature or an energy carries it as data, not as text: it is written
 * with the tag `msg` and the quantity wrapped in `kelvin(T)` or `joulesPerMole(J)`,
 *   fail('none', msg`no miscibility gap at T = ${kelvin(T)}: ...`)
 * and whoever shows it (the functions layer, which knows the card) writes the quantity in the
 * user's unit with `MixgapError.text(units)`. `message` holds it in kelvin and J/mol.
 */
export type FailureReason =
  /** The question has no answer for these inputs (no gap at this temperature, no critical point...). */
  | 'none'
  /** A number lies outside its valid range (x outside (0, 1), T <= 0, a gap number that does not exist). */
  | 'range'
  /** Input that cannot describe a system (malformed parameters). */
  | 'input'
  /** An iteration did not meet its tolerance: the answer would not be trustworthy. */
  | 'convergence';

/** A temperature (kelvin) or an energy (J/mol) named in a message. */
export interface Quantity {
  readonly kind: 'temperature' | 'energy';
  /** In kelvin or J/mol. */
  readonly value: number;
}

export const kelvin = (T: number): Quantity => ({ kind: 'temperature', value: T });
export const joulesPerMole = (J: number): Quantity => ({ kind: 'energy', value: J });

/** A message as its literal parts and the values between them (quantities among them). */
export interface Message {
  readonly parts: readonly string[];
  readonly values: readonly unknown[];
}

/** Tag for a message with quantities in it: msg`gap at T = ${kelvin(T)}`. */
export function msg(parts: TemplateStringsArray, ...values: unknown[]): Message {
  return { parts: [...parts], values };
}

/** How quantities are written: a temperature given in kelvin, an energy given in J/mol. */
export interface UnitWriter {
  temperature(K: number): string;
  energy(J: number): string;
}

/**
 * A number as a person would write it. A temperature the user typed comes back through a unit
 * conversion with noise in its last bits (929.46 °C -> 1202.61 K -> 929.4599999999778): rounded to
 * 12 significant digits it is the number typed again, shown as such when that takes at most 9
 * digits. Anything else (a computed value) is shown to 6 significant digits.
 */
export function formatNumber(v: number): string {
  if (!Number.isFinite(v) || v === 0) return String(v);
  const typed = Number(v.toPrecision(12));
  const digits = typed.toExponential().replace(/e.*$/, '').replace(/\D/g, '').length;
  return String(digits <= 9 ? typed : Number(v.toPrecision(6)));
}

/** Kelvin and J/mol. */
export const SI_UNITS: UnitWriter = {
  temperature: (K) => `${formatNumber(K)} K`,
  energy: (J) => `${formatNumber(J)} J/mol`,
};

/** A message written out, its quantities in the given units. */
export function render(message: Message | string, units: UnitWriter = SI_UNITS): string {
  if (typeof message === 'string') return message;
  let out = message.parts[0];
  message.values.forEach((v, i) => {
    out += (isQuantity(v) ? (v.kind === 'temperature' ? units.temperature(v.value) : units.energy(v.value)) : String(v)) + message.parts[i + 1];
  });
  return out;
}

function isQuantity(v: unknown): v is Quantity {
  return typeof v === 'object' && v !== null && ((v as Quantity).kind === 'temperature' || (v as Quantity).kind === 'energy') && typeof (v as Quantity).value === 'number';
}

export class MixgapError extends Error {
  readonly reason: FailureReason;
  private readonly template: Message | string;
  constructor(reason: FailureReason, message: Message | string) {
    super(render(message));
    this.name = 'MixgapError';
    this.reason = reason;
    this.template = message;
  }

  /** The message with its temperatures and energies in the given units. */
  text(units: UnitWriter): string {
    return render(this.template, units);
  }
}

export function fail(reason: FailureReason, message: Message | string): never {
  throw new MixgapError(reason, message);
}
