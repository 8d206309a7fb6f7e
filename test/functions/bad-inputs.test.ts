/**
 * Issue 6: bad inputs to every cell function. A table: each row is one call that must fail with the
 * Excel error code given and a message that says what to fix (a regex it must match). The rows are
 * also the documentation of the README section "What the errors mean" (columns error, when, example).
 *
 * Every call is made directly (in Node the functions throw a CellFailure); nothing may throw
 * anything else, and nothing may return a number. A subset also goes through the embedded formula
 * engine as formula text, where the same code and message must reach the cell.
 *
 * Where today's behaviour is wrong the row keeps the right expectation (and fails until fixed).
 */
import { beforeAll, describe, expect, it } from 'vitest';
import type { HyperFormula } from 'hyperformula';
import { CellFailure, type CellErrorCode } from '../../src/functions/errors';
import * as fitFns from '../../src/functions/fitting';
import * as fns from '../../src/functions/functions';
import { evaluateFormulas } from '../../src/hosts/evaluate';
import { buildMixgapEngine } from '../../src/hosts/mixgap-engine';
import { generatedMetadata } from './support/evaluate';

/** A regular solution with Omega = 21000 J/mol: Tc = Omega/2R = 1263 K (spec, closed forms), one gap below. */
const OMEGA = 21000;
const REGULAR = [['model', 'regular'], ['omega', OMEGA]];
const CELSIUS = [['model', 'regular'], ['omega', OMEGA], ['temperature', '°C']];
const FH = [['model', 'flory-huggins'], ['NA', 1], ['NB', 100], ['chi.A', 0.3], ['chi.B', 200]];
const NRTL = [['model', 'nrtl'], ['a12', 0], ['b12', 800], ['a21', 0], ['b21', 1200], ['alpha', 0.2]];
const card = (...rows: unknown[][]) => rows;

interface Row {
  /** The call as it reads in a cell (also the README example). */
  formula: string;
  call: () => unknown;
  code: CellErrorCode;
  /** What the message must say (what to fix). */
  message: RegExp;
  /** When this error happens, in words (README). */
  when: string;
  /** Also evaluate `formula` through the embedded engine. */
  engine?: boolean;
}

/** The table, calling the cell functions of `f` (functions.ts) and `fit` (fitting.ts). */
const table = (f: typeof fns, fit: typeof fitFns): Row[] => [
  // --- text, empty cells and booleans where a number goes ---
  { formula: 'GAPLOW("abc", 21000)', call: () => f.gapLow('abc' as any, OMEGA as any), code: '#VALUE!', message: /T is the text "abc": give a number/, when: 'text where a number goes' },
  { formula: 'GAPHIGH(800, 21000, "two")', call: () => f.gapHigh(800, OMEGA as any, 'two' as any), code: '#VALUE!', message: /gap is the text "two": give a number/, when: 'text where a number goes' },
  { formula: 'PHASEFRAC("0.3x", 800, 21000)', call: () => f.phaseFrac('0.3x' as any, 800, OMEGA as any), code: '#VALUE!', message: /x0 is the text "0\.3x": give a number/, when: 'text where a number goes' },
  { formula: 'GMIX(0.3, "hot", 21000)', call: () => f.gMix(0.3, 'hot' as any, OMEGA as any), code: '#VALUE!', message: /T is the text "hot"/, when: 'text where a number goes' },
  { formula: 'GAPTABLE(300, 900, "ten", 21000)', call: () => f.gapTable(300, 900, 'ten' as any, OMEGA as any), code: '#VALUE!', message: /rows is the text "ten": give a number/, when: 'text where a number goes' },
  { formula: 'GAPLOW(800, {20000,"x",0})', call: () => f.gapLow(800, [[20000, 'x', 0]]), code: '#VALUE!', message: /params row 1, column 2 holds "x": every parameter must be a number/, when: 'text inside a Redlich–Kister range', engine: true },
  { formula: 'GAPLOW(<empty>, 21000)', call: () => f.gapLow(null as any, OMEGA as any), code: '#VALUE!', message: /T is empty: give a number/, when: 'an empty cell where a number is required' },
  { formula: 'GAPLOW("", 21000)', call: () => f.gapLow('' as any, OMEGA as any), code: '#VALUE!', message: /T is empty: give a number/, when: 'an empty cell where a number is required' },
  { formula: 'GAPLOW(, 21000)', call: () => f.gapLow(undefined as any, OMEGA as any), code: '#VALUE!', message: /T is empty: give a number/, when: 'an omitted required argument', engine: true },
  { formula: 'ACTIVITY(<empty>, 800, 21000)', call: () => f.activity(null as any, 800, OMEGA as any), code: '#VALUE!', message: /x is empty: give a number/, when: 'an empty cell where a number is required' },
  { formula: 'GAPLOW(800, <empty range>)', call: () => f.gapLow(800, [[null, null], [null, null]]), code: '#VALUE!', message: /params is empty: give Omega/, when: 'params is an empty range' },
  { formula: 'GAPLOW(800, "")', call: () => f.gapLow(800, '' as any), code: '#VALUE!', message: /params is empty/, when: 'params is an empty cell' },
  { formula: 'CRITCOUNT(<omitted>)', call: () => f.critCount(undefined as any), code: '#VALUE!', message: /params is empty/, when: 'params is missing' },
  { formula: 'GAPLOW(TRUE, 21000)', call: () => f.gapLow(true as any, OMEGA as any), code: '#VALUE!', message: /T is TRUE\/FALSE: give a number/, when: 'TRUE or FALSE where a number goes' },
  { formula: 'TGAP(FALSE, 21000)', call: () => f.tGap(false as any, OMEGA as any), code: '#VALUE!', message: /x0 is TRUE\/FALSE: give a number/, when: 'TRUE or FALSE where a number goes' },
  { formula: 'GAPLOW(800, 21000, TRUE)', call: () => f.gapLow(800, OMEGA as any, true as any), code: '#VALUE!', message: /gap is TRUE\/FALSE: give a number/, when: 'TRUE or FALSE where a number goes' },
  { formula: 'GAPLOW(800, {TRUE})', call: () => f.gapLow(800, [[true]]), code: '#VALUE!', message: /params row 1, column 1 holds true: every parameter must be a number/, when: 'TRUE or FALSE inside params', engine: true },
  // --- NaN and infinities (reach the functions from other programs, not from Excel) ---
  { formula: 'GAPLOW(NaN, 21000)', call: () => f.gapLow(NaN, OMEGA as any), code: '#NUM!', message: /T is not a number \(NaN\)/, when: 'NaN where a number goes' },
  { formula: 'GAPLOW(Infinity, 21000)', call: () => f.gapLow(Infinity, OMEGA as any), code: '#NUM!', message: /T must be finite/, when: 'an infinite number' },
  { formula: 'GMIX(0.3, -Infinity, 21000)', call: () => f.gMix(0.3, -Infinity, OMEGA as any), code: '#NUM!', message: /T must be finite/, when: 'an infinite number' },
  { formula: 'PHASEFRAC(NaN, 800, 21000)', call: () => f.phaseFrac(NaN, 800, OMEGA as any), code: '#NUM!', message: /x0 is not a number \(NaN\)/, when: 'NaN where a number goes' },
  { formula: 'GAPLOW(800, {NaN})', call: () => f.gapLow(800, [[NaN]]), code: '#NUM!', message: /params row 1, column 1 is not a finite number/, when: 'NaN or infinity inside params' },
  { formula: 'GAPLOW(800, {20000, Infinity, 0})', call: () => f.gapLow(800, [[20000, Infinity, 0]]), code: '#NUM!', message: /params row 1, column 2 is not a finite number/, when: 'NaN or infinity inside params' },
  { formula: 'TCRIT(card with omega = Infinity)', call: () => f.tCrit(card(['model', 'regular'], ['omega', Infinity])), code: '#VALUE!', message: /"omega" must be a finite number/, when: 'a card value that is not a finite number' },
  // --- compositions at or outside 0 and 1 ---
  { formula: 'GMIX(0, 800, 21000)', call: () => f.gMix(0, 800, OMEGA as any), code: '#NUM!', message: /x = 0: a mole fraction must lie strictly between 0 and 1/, when: 'a composition at or outside 0 and 1', engine: true },
  { formula: 'GMIX(1, 800, 21000)', call: () => f.gMix(1, 800, OMEGA as any), code: '#NUM!', message: /x = 1: a mole fraction must lie strictly between 0 and 1/, when: 'a composition at or outside 0 and 1' },
  { formula: 'ACTIVITY(-0.1, 800, 21000)', call: () => f.activity(-0.1, 800, OMEGA as any), code: '#NUM!', message: /x = -0\.1: a mole fraction must lie strictly between 0 and 1/, when: 'a composition at or outside 0 and 1' },
  { formula: 'TGAP(1.5, 21000)', call: () => f.tGap(1.5, OMEGA as any), code: '#NUM!', message: /x0 = 1\.5: a mole fraction must lie strictly between 0 and 1/, when: 'a composition at or outside 0 and 1', engine: true },
  { formula: 'PHASEFRAC(0, 800, 21000)', call: () => f.phaseFrac(0, 800, OMEGA as any), code: '#NUM!', message: /x0 = 0: a mole fraction/, when: 'a composition at or outside 0 and 1' },
  { formula: 'DRIVEFORCE(1, 800, 21000)', call: () => f.driveForce(1, 800, OMEGA as any), code: '#NUM!', message: /x0 = 1: a mole fraction/, when: 'a composition at or outside 0 and 1' },
  { formula: 'CHEMPOT(2, 800, 21000, "A")', call: () => f.chemPot(2, 800, OMEGA as any, 'A'), code: '#NUM!', message: /x = 2: a mole fraction/, when: 'a composition at or outside 0 and 1' },
  // --- temperatures at or below absolute zero ---
  { formula: 'GAPLOW(0, 21000)', call: () => f.gapLow(0, OMEGA as any), code: '#NUM!', message: /T = 0 K is not above absolute zero \(0 K\)/, when: 'a temperature at or below absolute zero', engine: true },
  { formula: 'GAPCOUNT(-5, 21000)', call: () => f.gapCount(-5, OMEGA as any), code: '#NUM!', message: /T = -5 K is not above absolute zero/, when: 'a temperature at or below absolute zero' },
  { formula: 'SPINLOW(0, 21000)', call: () => f.spinLow(0, OMEGA as any), code: '#NUM!', message: /T = 0 K is not above absolute zero/, when: 'a temperature at or below absolute zero' },
  { formula: 'GAPTABLE(0, 900, 11, 21000)', call: () => f.gapTable(0, 900, 11, OMEGA as any), code: '#NUM!', message: /T1 = 0 K is not above absolute zero/, when: 'a temperature at or below absolute zero' },
  { formula: 'DECOMPGAIN(0.5, -1, 21000)', call: () => f.decompGain(0.5, -1, OMEGA as any), code: '#NUM!', message: /T = -1 K is not above absolute zero/, when: 'a temperature at or below absolute zero' },
  { formula: 'GAPLOW(-300, °C card)', call: () => f.gapLow(-300, CELSIUS), code: '#NUM!', message: /T = -300 °C is not above absolute zero \(-273\.15 °C\)/, when: 'below absolute zero in a °C card', engine: true },
  { formula: 'GMIX(0.3, -273.15, °C card)', call: () => f.gMix(0.3, -273.15, CELSIUS), code: '#NUM!', message: /T = -273\.15 °C is not above absolute zero/, when: 'below absolute zero in a °C card' },
  // --- huge and tiny parameters ---
  { formula: 'GAPLOW(800, 1E12)', call: () => f.gapLow(800, 1e12 as any), code: '#NUM!', message: /1e-300/, when: 'parameters so large that a boundary lies closer than 1e-300 to a pure component' },
  { formula: 'GAPLOW(800, {0, 1E12, 0})', call: () => f.gapLow(800, [[0, 1e12, 0]]), code: '#NUM!', message: /1e-300|too large/, when: 'parameters so large that a boundary lies closer than 1e-300 to a pure component' },
  { formula: 'GAPLOW(300, FH card with chi.A = 1E12)', call: () => f.gapLow(300, card(['model', 'fh'], ['NA', 1], ['NB', 1], ['chi.A', 1e12])), code: '#NUM!', message: /1e-300|too large/, when: 'parameters so large that a boundary lies closer than 1e-300 to a pure component' },
  // An NRTL card whose tau21 = -1e6 makes G21 = exp(-alpha tau21) overflow: the parameters are too
  // large for double precision, which the message must say (today: "g'' cannot be evaluated").
  { formula: 'GAPLOW(300, NRTL card with a21 = -1E6)', call: () => f.gapLow(300, card(['model', 'nrtl'], ['a12', 0], ['a21', -1e6], ['alpha', 0.2])), code: '#NUM!', message: /too large|overflow/, when: 'parameters so large that the model overflows' },
  // exp(mu/RT) beyond the largest double: a cell must not show Infinity (nor 0 from the engine's
  // rounding of it) but say that the parameters are too large for this quantity
  { formula: 'ACTIVITY(0.5, 800, 1E12)', call: () => f.activity(0.5, 800, 1e12 as any), code: '#NUM!', message: /too large|overflow/, when: 'a result beyond the range of numbers (parameters far too large)', engine: true },
  { formula: 'ACTCOEF(0.5, 800, 1E12, "A")', call: () => f.actCoef(0.5, 800, 1e12 as any, 'A'), code: '#NUM!', message: /too large|overflow/, when: 'a result beyond the range of numbers (parameters far too large)' },
  // A chain's activity below the smallest normal double (Flory–Huggins, 10000-mer at phi = 0.1,
  // chi = 0.55: ln a = -4546.4): not 0, not a subnormal with lost digits, but an error that points to
  // CHEMPOT, which keeps the logarithm (issue "polymer activities per molecule")
  { formula: 'ACTIVITY(0.1, 300, FH card with NB = 10000, chi.A = 0.55)', call: () => f.activity(0.1, 300, card(['model', 'fh'], ['NA', 1], ['NB', 10000], ['chi.A', 0.55])), code: '#NUM!', message: /exp\(-4546\.4\), below 2\.2e-308.*CHEMPOT/, when: 'an activity or activity coefficient below 2.2e-308 (long chains): CHEMPOT gives RT ln a' },
  { formula: 'GMIX(0.5, 800, {1E308,1E308})', call: () => f.gMix(0.5, 800, [[1e308, 1e308]]), code: '#NUM!', message: /too large|overflow/, when: 'a result beyond the range of numbers (parameters far too large)' },
  { formula: 'TCRIT(1E12)', call: () => f.tCrit(1e12 as any), code: '#N/A', message: /no critical point: it is split into two phases at every temperature searched \(1 K to 20000 K\); .*unit of the energies/, when: 'no critical point in 1 K to 20000 K, split at every temperature (Tc = Omega/2R = 6e10 K here)' },
  { formula: 'TCRIT(1E-300)', call: () => f.tCrit(1e-300 as any), code: '#N/A', message: /no critical point: it is one phase at every temperature searched \(1 K to 20000 K\)/, when: 'no critical point in 1 K to 20000 K, one phase at every temperature' },
  { formula: 'GAPLOW(800, 1E-300)', call: () => f.gapLow(800, 1e-300 as any), code: '#N/A', message: /no miscibility gap at T = 800 K/, when: 'no gap at that temperature' },
  // --- ranges of the wrong shape ---
  { formula: 'GAPLOW(800, {20000,0,0,5})', call: () => f.gapLow(800, [[20000, 0, 0, 5]]), code: '#VALUE!', message: /params has 4 columns: a Redlich–Kister row has at most 3/, when: 'a params range with more than 3 columns', engine: true },
  { formula: 'GAPLOW(800, {20000,0,0; , , ; 1000,0,0})', call: () => f.gapLow(800, [[20000, 0, 0], [null, null, null], [1000, 0, 0]]), code: '#VALUE!', message: /params row 2 \(term L1\) is empty: write 0 for a term that is zero/, when: 'an empty row between Redlich–Kister rows' },
  { formula: 'GAPLOW(800, 3-column card)', call: () => f.gapLow(800, card(['model', 'regular', 'x'], ['omega', OMEGA])), code: '#VALUE!', message: /row 1 has more than two cells/, when: 'a card with more than two columns' },
  // --- a gap, interval or critical point that does not exist, or is not a whole number ---
  { formula: 'GAPLOW(800, 21000, 2)', call: () => f.gapLow(800, OMEGA as any, 2), code: '#NUM!', message: /gap 2 does not exist at T = 800 K: there is 1 gap/, when: 'a gap number that does not exist at T', engine: true },
  { formula: 'GAPLOW(800, 21000, 1.5)', call: () => f.gapLow(800, OMEGA as any, 1.5), code: '#NUM!', message: /gap = 1\.5: give a whole number 1, 2, \.\.\./, when: 'a gap, interval or critical-point number that is not a whole number >= 1' },
  { formula: 'GAPHIGH(800, 21000, 0)', call: () => f.gapHigh(800, OMEGA as any, 0), code: '#NUM!', message: /gap = 0: give a whole number/, when: 'a gap, interval or critical-point number that is not a whole number >= 1' },
  { formula: 'GAPLOW(800, 21000, -1)', call: () => f.gapLow(800, OMEGA as any, -1), code: '#NUM!', message: /gap = -1: give a whole number/, when: 'a gap, interval or critical-point number that is not a whole number >= 1' },
  { formula: 'SPINLOW(800, 21000, 3)', call: () => f.spinLow(800, OMEGA as any, 3), code: '#NUM!', message: /unstable interval 3 does not exist at T = 800 K/, when: 'an unstable-interval number that does not exist at T' },
  { formula: 'SPINHIGH(2000, 21000)', call: () => f.spinHigh(2000, OMEGA as any), code: '#N/A', message: /no unstable interval at T = 2000 K/, when: 'no unstable interval at that temperature' },
  { formula: 'TCRIT(21000, 2)', call: () => f.tCrit(OMEGA as any, 2), code: '#NUM!', message: /critical point 2 does not exist: this system has 1/, when: 'a critical-point number that does not exist', engine: true },
  { formula: 'XCRIT(21000, 0.5)', call: () => f.xCrit(OMEGA as any, 0.5), code: '#NUM!', message: /n = 0\.5: give a whole number/, when: 'a gap, interval or critical-point number that is not a whole number >= 1' },
  { formula: 'CRITKIND(-8000)', call: () => f.critKind(-8000 as any), code: '#N/A', message: /no critical point: it is one phase at every temperature searched/, when: 'no critical point in 1 K to 20000 K, one phase at every temperature' },
  { formula: 'GAPLOW(2000, 21000)', call: () => f.gapLow(2000, OMEGA as any), code: '#N/A', message: /no miscibility gap at T = 2000 K/, when: 'no gap at that temperature', engine: true },
  { formula: 'TGAP(0.5, -8000)', call: () => f.tGap(0.5, -8000 as any), code: '#N/A', message: /does not enter a miscibility gap between 1 K and 20000 K/, when: 'a composition that is in no gap between 1 K and 20000 K' },
  { formula: 'TGAP(0.3, 1E6)', call: () => f.tGap(0.3, 1e6 as any), code: '#NUM!', message: /still inside a gap at 20000 K/, when: 'a composition still inside a gap at 20000 K' },
  // --- parameter cards ---
  { formula: 'GAPLOW(800, card with omega twice)', call: () => f.gapLow(800, card(['model', 'regular'], ['omega', 1], ['Omega', 2])), code: '#VALUE!', message: /the key "omega" appears twice: keep one/, when: 'a card key given twice', engine: true },
  { formula: 'GAPLOW(800, card with "omgea")', call: () => f.gapLow(800, card(['model', 'regular'], ['omega', OMEGA], ['omgea', 1])), code: '#VALUE!', message: /unknown key "omgea": the keys are/, when: 'an unknown card key' },
  { formula: 'GAPLOW(800, regular card with NA)', call: () => f.gapLow(800, card(['model', 'regular'], ['omega', OMEGA], ['NA', 1])), code: '#VALUE!', message: /"NA" belongs to a flory-huggins card, not to this regular card/, when: 'a key of another model' },
  { formula: 'GAPLOW(800, card without model)', call: () => f.gapLow(800, card(['omega', OMEGA])), code: '#VALUE!', message: /no "model" key: add a row model/, when: 'a card without its model', engine: true },
  { formula: 'GAPLOW(800, card with model "margules")', call: () => f.gapLow(800, card(['model', 'margules'], ['omega', OMEGA])), code: '#VALUE!', message: /model "margules" is unknown: write regular, redlich-kister, flory-huggins or nrtl/, when: 'an unknown model' },
  { formula: 'GAPLOW(800, card with omega empty)', call: () => f.gapLow(800, card(['model', 'regular'], ['omega', null])), code: '#VALUE!', message: /"omega" has no value: fill the cell beside it or remove the row/, when: 'a card key without a value' },
  { formula: 'GAPLOW(800, card with omega "big")', call: () => f.gapLow(800, card(['model', 'regular'], ['omega', 'big'])), code: '#VALUE!', message: /"omega" must be a number \(got "big"\)/, when: 'text where a card needs a number' },
  { formula: 'TCRIT(regular card without omega)', call: () => f.tCrit(card(['model', 'regular'])), code: '#VALUE!', message: /a regular card needs "omega"/, when: 'a card missing a parameter of its model' },
  { formula: 'CHECKCARD(nrtl card without alpha)', call: () => f.checkCard(NRTL.filter((r) => r[0] !== 'alpha')), code: '#VALUE!', message: /an nrtl card needs "alpha"/, when: 'a card missing a parameter of its model' },
  { formula: 'TCRIT(nrtl card with alpha = 0)', call: () => f.tCrit(NRTL.map((r) => (r[0] === 'alpha' ? ['alpha', 0] : r))), code: '#VALUE!', message: /NRTL alpha must be above 0/, when: 'a model parameter outside its range' },
  { formula: 'TCRIT(fh card with NA = 0.5)', call: () => f.tCrit(FH.map((r) => (r[0] === 'NA' ? ['NA', 0.5] : r))), code: '#VALUE!', message: /chain length NA must be a number >= 1/, when: 'a model parameter outside its range' },
  { formula: 'GAPLOW(800, card with energy "kJ")', call: () => f.gapLow(800, [...REGULAR, ['energy', 'kJ']]), code: '#VALUE!', message: /energy unit "kJ" is not one Mixgap reads: write one of J\/mol, kJ\/mol/, when: 'an unknown energy unit' },
  { formula: 'GAPLOW(800, card with temperature "F")', call: () => f.gapLow(800, [...REGULAR, ['temperature', 'F']]), code: '#VALUE!', message: /temperature unit "F" is not one Mixgap reads: write K or °C/, when: 'an unknown temperature unit' },
  { formula: 'GAPLOW(800, rk card with L0 and L2 only)', call: () => f.gapLow(800, card(['model', 'rk'], ['L0', 20000], ['L2', 1000])), code: '#VALUE!', message: /L1 is missing while L2 is given: write L1 \| 0/, when: 'a Redlich–Kister card with a missing term' },
  { formula: 'GAPLOW(800, card row without key)', call: () => f.gapLow(800, card(['model', 'regular'], [5, OMEGA])), code: '#VALUE!', message: /row 2 has no key in its first cell/, when: 'a card row without a key' },
  // --- words where a choice is asked ---
  { formula: 'ACTIVITY(0.3, 800, 21000, "C")', call: () => f.activity(0.3, 800, OMEGA as any, 'C'), code: '#VALUE!', message: /component "C": write "A" or "B"/, when: 'a component other than A, B or the card\'s names', engine: true },
  { formula: 'ACTCOEF(0.3, 800, 21000, 2)', call: () => f.actCoef(0.3, 800, OMEGA as any, 2 as any), code: '#VALUE!', message: /component 2: write "A" or "B"/, when: 'a component other than A, B or the card\'s names' },
  { formula: 'PHASEFRAC(0.3, 800, 21000, "middle")', call: () => f.phaseFrac(0.3, 800, OMEGA as any, 'middle'), code: '#VALUE!', message: /phase = "middle": write "low" \(the A-rich phase\) or "high"/, when: 'a phase other than "low" or "high"' },
  // --- GAPTABLE rows ---
  { formula: 'GAPTABLE(300, 900, 1, 21000)', call: () => f.gapTable(300, 900, 1, OMEGA as any), code: '#NUM!', message: /rows = 1: give a whole number of rows from 2 to 10000/, when: 'GAPTABLE rows outside 2 to 10000 or not whole' },
  { formula: 'GAPTABLE(300, 900, 10001, 21000)', call: () => f.gapTable(300, 900, 10001, OMEGA as any), code: '#NUM!', message: /rows = 10001: give a whole number of rows from 2 to 10000/, when: 'GAPTABLE rows outside 2 to 10000 or not whole' },
  { formula: 'GAPTABLE(300, 900, 10.5, 21000)', call: () => f.gapTable(300, 900, 10.5, OMEGA as any), code: '#NUM!', message: /rows = 10\.5: give a whole number of rows/, when: 'GAPTABLE rows outside 2 to 10000 or not whole' },
  { formula: 'GAPTABLE(300, 900, 11, 21000, 0)', call: () => f.gapTable(300, 900, 11, OMEGA as any, 0), code: '#NUM!', message: /gap = 0: give a whole number/, when: 'a gap, interval or critical-point number that is not a whole number >= 1' },
  // --- other functions ---
  { formula: 'GEXCESS(0.5, 800, {1,2,3,4})', call: () => f.gExcess(0.5, 800, [[1, 2, 3, 4]]), code: '#VALUE!', message: /params has 4 columns/, when: 'a params range with more than 3 columns' },
  { formula: 'CHEMPOT(0.5, 800, FH card with NB = "long")', call: () => f.chemPot(0.5, 800, FH.map((r) => (r[0] === 'NB' ? ['NB', 'long'] : r))), code: '#VALUE!', message: /"NB" must be a number \(got "long"\)/, when: 'text where a card needs a number' },
  { formula: 'MASSFRAC(1.5, "H2O", "C6H6")', call: () => fit.massFrac(1.5, 'H2O', 'C6H6'), code: '#NUM!', message: /1\.5/, when: 'a composition at or outside 0 and 1' },
  { formula: 'MOLARMASS("Xy2")', call: () => fit.molarMass('Xy2'), code: '#VALUE!', message: /Xy/, when: 'a formula with an unknown element' },
  { formula: 'FITCRIT("abc")', call: () => fit.fitCrit('abc' as any), code: '#VALUE!', message: /Tc is the text "abc": give a number/, when: 'text where a number goes' },
  { formula: 'GAPRESID(800, 0.05, 21000, "middle")', call: () => fit.gapResid(800, 0.05, OMEGA as any, 'middle'), code: '#VALUE!', message: /"middle".*"low".*"high"/, when: 'a phase other than "low" or "high"' },
];
const rows = table(fns, fitFns);
const f = fns;

const metadata = generatedMetadata;

/** The CellFailure a call throws; a returned value or any other exception is reported as such. */
function outcome(call: () => unknown): CellFailure | string {
  try {
    const v = call();
    return `returned ${typeof v === 'number' ? String(v) : JSON.stringify(v)}`;
  } catch (e) {
    return e instanceof CellFailure ? e : `threw ${e instanceof Error ? `${e.name}: ${e.message}` : String(e)} (not a CellFailure)`;
  }
}

describe('bad inputs, called directly: a CellFailure with the right code and a message that says what to fix', () => {
  it('the table has at least 50 rows and covers every cell function of functions.ts', () => {
    expect(rows.length).toBeGreaterThanOrEqual(50);
    const called = new Set(rows.map((r) => /^([A-Z]+)\(/.exec(r.formula)?.[1]));
    for (const name of Object.keys(f)) expect(called, `no row for ${name.toUpperCase()}`).toContain(name.toUpperCase());
  });

  for (const row of rows) {
    it(`${row.formula} -> ${row.code}`, () => {
      const got = outcome(row.call);
      if (typeof got === 'string') expect.fail(`${row.formula}: ${got}; want ${row.code} matching ${row.message}`);
      expect(got.code, got.message).toBe(row.code);
      expect(got.message).toMatch(row.message);
    });
  }
});

describe('bad inputs through the embedded formula engine: the code and the message reach the cell', () => {
  let engine: HyperFormula;
  beforeAll(async () => {
    engine = buildMixgapEngine(await metadata());
  });

  /** Formula text of the rows marked `engine` (cards and ranges written as inline arrays). */
  const formulas: Record<string, string> = {
    'GAPLOW(800, {20000,"x",0})': '=MIXGAP.GAPLOW(800, {20000,"x",0})',
    'GAPLOW(, 21000)': '=MIXGAP.GAPLOW(, 21000)',
    'GAPLOW(800, {TRUE})': '=MIXGAP.GAPLOW(800, {TRUE})',
    'GMIX(0, 800, 21000)': '=MIXGAP.GMIX(0, 800, 21000)',
    'TGAP(1.5, 21000)': '=MIXGAP.TGAP(1.5, 21000)',
    'GAPLOW(0, 21000)': '=MIXGAP.GAPLOW(0, 21000)',
    'GAPLOW(-300, °C card)': '=MIXGAP.GAPLOW(-300, {"model","regular";"omega",21000;"temperature","°C"})',
    'GAPLOW(800, {20000,0,0,5})': '=MIXGAP.GAPLOW(800, {20000,0,0,5})',
    'GAPLOW(800, 21000, 2)': '=MIXGAP.GAPLOW(800, 21000, 2)',
    'TCRIT(21000, 2)': '=MIXGAP.TCRIT(21000, 2)',
    'GAPLOW(2000, 21000)': '=MIXGAP.GAPLOW(2000, 21000)',
    'GAPLOW(800, card with omega twice)': '=MIXGAP.GAPLOW(800, {"model","regular";"omega",1;"Omega",2})',
    'GAPLOW(800, card without model)': '=MIXGAP.GAPLOW(800, {"omega",21000})',
    'ACTIVITY(0.3, 800, 21000, "C")': '=MIXGAP.ACTIVITY(0.3, 800, 21000, "C")',
    'ACTIVITY(0.5, 800, 1E12)': '=MIXGAP.ACTIVITY(0.5, 800, 1e12)',
  };

  for (const row of rows.filter((r) => r.engine)) {
    it(`${formulas[row.formula]} -> ${row.code}`, () => {
      expect(formulas[row.formula], `formula text for ${row.formula}`).toBeDefined();
      const got = evaluateFormulas(engine, [formulas[row.formula]])[0] as { error?: string; message?: string };
      expect(got.error, JSON.stringify(got)).toBe(row.code);
      expect(got.message).toMatch(row.message);
    });
  }

  // The engine's own coercion: text that is not a number in a number argument is refused before
  // the function runs. The cell still shows #VALUE! (Excel does the same).
  it('=MIXGAP.GAPLOW("abc", 21000) -> #VALUE!', () => {
    const got = evaluateFormulas(engine, ['=MIXGAP.GAPLOW("abc", 21000)'])[0] as { error?: string };
    expect(got.error).toBe('#VALUE!');
  });

  // Excel writes large and small numbers as 1E+12 in formulas (and in the formulas of saved
  // workbooks that mixgap calc reads): the engine must read them as numbers, not fail to parse.
  it('a number written as Excel writes it (1E+12, 2.1E4) reads as a number, not a parsing error', () => {
    const [upper, lower] = evaluateFormulas(engine, ['=MIXGAP.TCRIT(1E+12)', '=MIXGAP.TCRIT(1e12)']);
    expect(upper).toEqual(lower);
    expect(evaluateFormulas(engine, ['=MIXGAP.GMIX(0.5, 800, 2.1E4)'])[0]).toBe(f.gMix(0.5, 800, 21000 as any));
  });

  it('GAPTABLE with rows out of range: #VALUE! over the cell, saying what to write (the spill size comes first)', () => {
    const got = evaluateFormulas(engine, ['=MIXGAP.GAPTABLE(300, 900, 1, 21000)'])[0] as { error?: string; message?: string };
    expect(got.error).toBe('#VALUE!');
    expect(got.message).toMatch(/rows = 1: give a whole number of rows from 2 to 10000/);
  });

  it('GAPTABLE with a gap that never exists in the range: every composition cell is #N/A, the temperatures stay', () => {
    const got = evaluateFormulas(engine, ['=MIXGAP.GAPTABLE(300, 900, 4, 21000, 2)'])[0] as unknown[][];
    expect(Array.isArray(got)).toBe(true);
    expect(got.map((r) => r[0])).toEqual([300, 500, 700, 900]);
    for (const r of got) for (const c of r.slice(1)) expect((c as { error?: string }).error).toBe('#N/A');
  });
});

/**
 * Issue "messages speak the card's units": the whole table again, each call's parameters turned
 * into a card in °C (temperature arguments T, T1, T2 moved by -273.15, the same physics) and into a
 * card in kJ/mol (energies divided by 1000). Each call must fail with the same code, and every
 * temperature or energy its message names must be in the card's unit: "800 K" in the kelvin
 * message is "526.85 °C" in the °C one, no number is followed by " K" there, and no number by
 * " J/mol" in the kJ/mol one. Parameters that cannot be a card (malformed ranges, empty params)
 * run unchanged and their messages must name no temperature or energy at all.
 */
describe('bad inputs in a °C card and a kJ/mol card: every message names temperatures and energies in the card\'s units', () => {
  type Unit = '°C' | 'kJ/mol';
  let names: Map<string, string[]>;
  beforeAll(async () => {
    names = new Map((await metadata()).functions.map((m) => [m.id, m.parameters.map((p) => p.name)]));
  });

  const isCard = (p: unknown): p is unknown[][] =>
    Array.isArray(p) && Array.isArray(p[0]) && typeof (p[0] as unknown[])[0] === 'string';
  const keyOf = (row: unknown[]) => (typeof row[0] === 'string' ? row[0].trim().toLowerCase() : '');
  const ENERGY_KEY = /^(omega|l\d+(\.[bc])?)$/;

  /** params as a card in `unit`, or undefined when they cannot be one. */
  function toCard(p: unknown, unit: Unit): unknown[][] | undefined {
    const unitRow = unit === '°C' ? ['temperature', '°C'] : ['energy', 'kJ/mol'];
    const scale = (key: string, v: unknown) => (unit === 'kJ/mol' && ENERGY_KEY.test(key) && typeof v === 'number' ? v / 1000 : v);
    if (typeof p === 'number' && Number.isFinite(p)) return [['model', 'regular'], ['omega', scale('omega', p)], unitRow];
    if (isCard(p)) {
      if (p.some((row) => keyOf(row) === unitRow[0])) return undefined; // the card has its own unit already
      return [...p.map((row) => [row[0], scale(keyOf(row), row[1]), ...row.slice(2)]), unitRow];
    }
    // numeric Redlich–Kister rows a, b, c: L_k, L_k.b, L_k.c
    if (Array.isArray(p) && p.length > 0 && p.every((r) => Array.isArray(r) && r.length <= 3 && r.length > 0 && r.every((v) => typeof v === 'number' && Number.isFinite(v)))) {
      const rows = (p as number[][]).flatMap((r, k) => r.map((v, c) => [`L${k}${['', '.b', '.c'][c]}`, scale('l0', v)]));
      return [['model', 'rk'], ...rows, unitRow];
    }
    return undefined;
  }

  /** The cell functions of `mod` with their params turned into a card in `unit`; `converted` says whether it was. */
  function inUnit<M extends object>(mod: M, unit: Unit, converted: { value: boolean }): M {
    const wrapped: Record<string, unknown> = {};
    for (const [name, fn] of Object.entries(mod)) {
      if (typeof fn !== 'function') { wrapped[name] = fn; continue; }
      wrapped[name] = (...args: unknown[]) => {
        const params = names.get(name.toUpperCase()) ?? [];
        const at = params.indexOf('params');
        const card = at >= 0 ? toCard(args[at], unit) : undefined;
        converted.value = card !== undefined;
        if (!card) return fn(...args);
        const out = args.slice();
        out[at] = card;
        if (unit === '°C') params.forEach((p, i) => { if (/^T\d?$/.test(p) && typeof out[i] === 'number') out[i] = (out[i] as number) - 273.15; });
        return fn(...out);
      };
    }
    return wrapped as M;
  }

  /** Numbers written before a unit in a message. */
  const amounts = (text: string, unit: string) =>
    [...text.matchAll(new RegExp(`(-?\\d+(?:\\.\\d+)?(?:e[+-]?\\d+)?) ${unit.replace('/', '\\/')}(?![\\w/])`, 'g'))].map((m) => Number(m[1]));

  for (const unit of ['°C', 'kJ/mol'] as const) {
    it(`every row with a ${unit} card`, () => {
      const converted = { value: false };
      const inCard = table(inUnit(fns, unit, converted), inUnit(fitFns, unit, converted));
      let cards = 0, named = 0;
      rows.forEach((row, i) => {
        const plain = outcome(row.call);
        const got = outcome(inCard[i].call);
        if (typeof plain === 'string' || typeof got === 'string') expect.fail(`${row.formula} in ${unit}: ${typeof got === 'string' ? got : plain}`);
        const where = `${row.formula} in a ${unit} card: "${got.message}"`;
        expect(got.code, where).toBe(plain.code);
        // kelvin and J/mol named in the plain message, and what the card's message must say instead
        const kelvins = amounts(plain.message, 'K'), joules = amounts(plain.message, 'J/mol');
        if (!converted.value) {
          expect(kelvins.length + joules.length, `${row.formula}: params not expressible as a card, yet its message names a quantity`).toBe(0);
          return;
        }
        cards++;
        named += kelvins.length + joules.length;
        if (unit === '°C') {
          expect(amounts(got.message, 'K'), where).toEqual([]);
          // the number typed, or a search bound, converted: 12 significant digits drop the
          // round-off of the conversion (800 - 273.15 = 526.8500000000000227)
          for (const K of kelvins) expect(got.message, where).toContain(`${Number((K - 273.15).toPrecision(12))} °C`);
        } else {
          expect(amounts(got.message, 'J/mol'), where).toEqual([]);
          for (const J of joules) expect(got.message, where).toContain(`${Number((J / 1000).toPrecision(12))} kJ/mol`);
          for (const K of kelvins) expect(got.message, where).toContain(`${K} K`);
        }
      });
      // most rows carry a card, and the table names temperatures (no gap at T, search bounds ...)
      expect(cards).toBeGreaterThan(60);
      expect(named).toBeGreaterThan(10);
    });
  }
});
