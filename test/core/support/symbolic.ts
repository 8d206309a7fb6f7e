/**
 * Reference derivatives of g: mathjs differentiates the spec's formula symbolically and evaluates
 * the result in 36-digit decimal arithmetic, so the reference carries no rounding worth counting
 * next to the double-precision core.
 */
import { all, create, type BigNumber, type EvalFunction, type MathNode } from 'mathjs';
import type { GText } from './spec';

export const big = create(all, { number: 'BigNumber', precision: 36 });

type BigValue = BigNumber;

/** A double as a 36-digit decimal: its exact expansion (toPrecision(100) is exact for these doubles), rounded to 36 digits. */
export function exact(v: number): BigValue {
  return big.bignumber(v.toPrecision(100)) as BigValue;
}

/** g and its first three x-derivatives of one part of g, compiled. */
function compileOrders(text: string): EvalFunction[] {
  const nodes: MathNode[] = [big.parse(text)];
  for (let k = 1; k <= 3; k++) nodes.push(big.derivative(nodes[k - 1], 'x', { simplify: false }));
  return nodes.map((n) => n.compile());
}

export interface Reference {
  /** d^k g/dx^k at (x, T) (k = 0..3), with the sizes of the ideal and excess parts. */
  at(order: number, x: number, T: number): { value: number; ideal: number; excess: number };
  /** The same at x = 1/(1 + exp(-u)) computed in decimal arithmetic (for compositions near 1). */
  atU(order: number, u: number, T: number): { value: number; ideal: number; excess: number };
}

export function reference(text: GText): Reference {
  const ideal = compileOrders(text.ideal), excess = compileOrders(text.excess);
  const evaluate = (order: number, x: BigValue, T: number) => {
    const scope = { x, T: exact(T) };
    const i = ideal[order].evaluate(scope) as BigValue, e = excess[order].evaluate(scope) as BigValue;
    return { value: big.add(i, e) as BigValue, i, e };
  };
  const out = (r: { value: BigValue; i: BigValue; e: BigValue }) => ({
    value: big.number(r.value) as number, ideal: big.number(r.i) as number, excess: big.number(r.e) as number,
  });
  return {
    at: (order, x, T) => out(evaluate(order, exact(x), T)),
    atU: (order, u, T) => {
      const one = big.bignumber(1) as BigValue;
      const x = big.divide(one, big.add(one, big.exp(big.unaryMinus(exact(u)) as BigValue))) as BigValue;
      return out(evaluate(order, x, T));
    },
  };
}
