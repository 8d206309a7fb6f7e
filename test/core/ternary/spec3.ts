/**
 * The ternary spec's formulas (g of each model) written out again from the spec and nothing else:
 * as mathjs text in the independent variables xB, xC (x_A = 1 - xB - xC) for symbolic
 * differentiation, and as plain functions of (xA, xB, xC) for independent checks of the phase
 * split. Nothing in this file imports from src/.
 */
import { num, R_SPEC, R_TEXT, type RkTerm } from '../support/spec';

export interface Rk3 { AB: RkTerm[]; AC: RkTerm[]; BC: RkTerm[]; ternary?: { A: RkTerm; B: RkTerm; C: RkTerm } }
export interface Nrtl3 {
  a12: number; b12: number; a21: number; b21: number;
  a13: number; b13: number; a31: number; b31: number;
  a23: number; b23: number; a32: number; b32: number;
  alpha12: number; alpha13: number; alpha23: number;
}
export interface Fh3 { NA: number; NB: number; NC: number; chiAB: { A: number; B: number }; chiAC: { A: number; B: number }; chiBC: { A: number; B: number } }

/** g split into its ideal and excess parts, as mathjs text in xB, xC and T. */
export interface GText3 { ideal: string; excess: string }

const XA = '(1 - xB - xC)';
const termText = (t: RkTerm) => `(${num(t.a)} + ${num(t.b)}*T + ${num(t.c)}*T*log(T))`;

export function rk3Text(p: Rk3): GText3 {
  const pair = (terms: RkTerm[], i: string, j: string) =>
    terms.length === 0 ? '0' : `${i}*${j}*(${terms.map((t, k) => termText(t) + `*(${i} - ${j})`.repeat(k)).join(' + ')})`;
  const M = p.ternary;
  const tern = M ? ` + ${XA}*xB*xC*(${XA}*${termText(M.A)} + xB*${termText(M.B)} + xC*${termText(M.C)})` : '';
  return {
    ideal: `${R_TEXT}*T*(${XA}*log(${XA}) + xB*log(xB) + xC*log(xC))`,
    excess: `${pair(p.AB, XA, 'xB')} + ${pair(p.AC, XA, 'xC')} + ${pair(p.BC, 'xB', 'xC')}${tern}`,
  };
}

export function nrtl3Text(p: Nrtl3): GText3 {
  const x = [XA, 'xB', 'xC'];
  const tau = (i: number, j: number) => (i === j ? '0' : `(${num((p as never)[`a${i + 1}${j + 1}`])} + ${num((p as never)[`b${i + 1}${j + 1}`])}/T)`);
  const alpha = (i: number, j: number) => num((p as never)[`alpha${Math.min(i, j) + 1}${Math.max(i, j) + 1}`]);
  const G = (j: number, i: number) => (i === j ? '1' : `exp(-${alpha(j, i)}*${tau(j, i)})`);
  const terms = [0, 1, 2].map((i) => {
    const S = [0, 1, 2].map((j) => `${tau(j, i)}*${G(j, i)}*${x[j]}`).join(' + ');
    const D = [0, 1, 2].map((k) => `${G(k, i)}*${x[k]}`).join(' + ');
    return `${x[i]}*(${S})/(${D})`;
  });
  return {
    ideal: `${R_TEXT}*T*(${XA}*log(${XA}) + xB*log(xB) + xC*log(xC))`,
    excess: `${R_TEXT}*T*(${terms.join(' + ')})`,
  };
}

export function fh3Text(p: Fh3): GText3 {
  const chi = (c: { A: number; B: number }) => `(${num(c.A)} + ${num(c.B)}/T)`;
  return {
    ideal: `${R_TEXT}*T*((${XA}/${num(p.NA)})*log(${XA}) + (xB/${num(p.NB)})*log(xB) + (xC/${num(p.NC)})*log(xC))`,
    excess: `${R_TEXT}*T*(${chi(p.chiAB)}*${XA}*xB + ${chi(p.chiAC)}*${XA}*xC + ${chi(p.chiBC)}*xB*xC)`,
  };
}

const xlnx = (v: number) => (v > 0 ? v * Math.log(v) : 0);
const L = (t: RkTerm, T: number) => t.a + t.b * T + t.c * T * Math.log(T);

export function rk3G(p: Rk3, T: number, xA: number, xB: number, xC: number): number {
  const pair = (terms: RkTerm[], xi: number, xj: number) => {
    let s = 0;
    terms.forEach((t, k) => { s += L(t, T) * (xi - xj) ** k; });
    return xi * xj * s;
  };
  const M = p.ternary;
  const tern = M ? xA * xB * xC * (xA * L(M.A, T) + xB * L(M.B, T) + xC * L(M.C, T)) : 0;
  return R_SPEC * T * (xlnx(xA) + xlnx(xB) + xlnx(xC)) + pair(p.AB, xA, xB) + pair(p.AC, xA, xC) + pair(p.BC, xB, xC) + tern;
}

export function fh3G(p: Fh3, T: number, a: number, b: number, c: number): number {
  const chi = (q: { A: number; B: number }) => q.A + q.B / T;
  return R_SPEC * T * (xlnx(a) / p.NA + xlnx(b) / p.NB + xlnx(c) / p.NC + chi(p.chiAB) * a * b + chi(p.chiAC) * a * c + chi(p.chiBC) * b * c);
}

const nrtlCache = new WeakMap<Nrtl3, { T: number; tau: number[][]; G: number[][] }>();

export function nrtl3G(p: Nrtl3, T: number, xA: number, xB: number, xC: number): number {
  let c = nrtlCache.get(p);
  if (!c || c.T !== T) {
    const tauOf = (i: number, j: number) => (i === j ? 0 : (p as never)[`a${i + 1}${j + 1}`] + (p as never)[`b${i + 1}${j + 1}`] / T);
    const alpha = (i: number, j: number) => (p as never)[`alpha${Math.min(i, j) + 1}${Math.max(i, j) + 1}`] as number;
    const tau = [0, 1, 2].map((j) => [0, 1, 2].map((i) => tauOf(j, i)));
    const G = [0, 1, 2].map((j) => [0, 1, 2].map((i) => (i === j ? 1 : Math.exp(-alpha(j, i) * tau[j][i]))));
    c = { T, tau, G };
    nrtlCache.set(p, c);
  }
  const x = [xA, xB, xC], { tau, G } = c;
  let e = 0;
  for (let i = 0; i < 3; i++) {
    let S = 0, D = 0;
    for (let j = 0; j < 3; j++) { S += tau[j][i] * G[j][i] * x[j]; D += G[j][i] * x[j]; }
    e += (x[i] * S) / D;
  }
  return R_SPEC * T * (xlnx(xA) + xlnx(xB) + xlnx(xC) + e);
}
