/**
 * Issue 6: the Excel bundle asks for nothing it does not need. dist/functions.js (built by npm test
 * before the tests run) makes no network calls and evaluates no text as code, read statically and
 * checked again by running every function in a context where code generation from strings is
 * switched off; manifest.xml asks for the least permission (Restricted: the functions never read
 * or write the workbook) and names no other domain.
 */
import { existsSync, readFileSync } from 'fs';
import path from 'path';
import vm from 'vm';
import { DOMParser } from '@xmldom/xmldom';
import { describe, expect, it } from 'vitest';

const root = path.join(__dirname, '..', '..');
const bundlePath = path.join(root, 'dist', 'functions.js');

/**
 * What the bundle must not contain, as patterns on its minified text:
 * - network: fetch(, XMLHttpRequest, WebSocket, EventSource, importScripts, sendBeacon, a dynamic
 *   import(, a Worker (which would load a script);
 * - code from text: eval (direct or indirect: any use of the name), new Function( or a call to the
 *   Function constructor without new (a call of a name ending in ...Function, such as mathjs's
 *   isTypedFunction(, is not one: the name must stand alone), setTimeout/setInterval with a string.
 */
const FORBIDDEN: Array<[string, RegExp]> = [
  ['fetch(', /(?<![\w$])fetch\s*\(/],
  ['XMLHttpRequest', /XMLHttpRequest/],
  ['WebSocket', /WebSocket/],
  ['EventSource', /EventSource/],
  ['importScripts', /importScripts/],
  ['sendBeacon', /sendBeacon/],
  ['dynamic import(', /(?<![\w$.])import\s*\(/],
  ['Worker', /new\s+(Shared)?Worker\s*\(/],
  ['eval', /(?<![\w$])eval(?![\w$])/],
  ['new Function(', /new\s+Function\s*\(/],
  ['Function( constructor call', /(?<![\w$.])Function\s*\(/],
  ['setTimeout/setInterval with a string', /set(Timeout|Interval)\s*\(\s*["'`]/],
];

function findings(text: string): string[] {
  const out: string[] = [];
  for (const [what, re] of FORBIDDEN) {
    const m = re.exec(text);
    if (m) out.push(`${what} at ${m.index}: ...${text.slice(Math.max(0, m.index - 80), m.index + 80)}...`);
  }
  return out;
}

describe('dist/functions.js', () => {
  it('exists (npm test builds first)', () => {
    expect(existsSync(bundlePath), `${bundlePath}: run npm run build`).toBe(true);
  });

  it('the detector finds each forbidden construct in a sample (so that a clean result means something)', () => {
    const samples = [
      'a=fetch("x")', 'new XMLHttpRequest', 'new WebSocket(u)', 'new EventSource(u)', 'importScripts(u)',
      'navigator.sendBeacon(u,d)', 'import("./x.js")', 'new Worker(u)', '(0,eval)(s)', 'new Function("a","return a")',
      'x=Function("return this")()', 'setTimeout("alert(1)",0)',
    ];
    samples.forEach((s, i) => expect(findings(s).map((f) => f.split(' at ')[0]), s).toContain(FORBIDDEN[i][0]));
    // and lets through what the bundle legitimately has
    expect(findings('e.isTypedFunction(t)&&n.evaluate(x)&&typeof f=="function"&&r.fetchRows')).toEqual([]);
  });

  it('makes no network call and evaluates no text as code', () => {
    expect(findings(readFileSync(bundlePath, 'utf8'))).toEqual([]);
  });

  it('names no URL (http:// or https://) in its code', () => {
    // The licence comments of bundled libraries (with their project URLs) are extracted by the
    // build into functions.js.LICENSE.txt, which nothing loads; the bundle points to it in a
    // comment without a URL. The Office runtime script is loaded by functions.html, not here.
    const urls = readFileSync(bundlePath, 'utf8').match(/https?:\/\/[^\s"'`)]*/g) ?? [];
    expect(urls).toEqual([]);
  });

  it('runs every function with code generation from strings switched off, and calls nothing on the network', () => {
    const network: string[] = [];
    const record = (name: string) => function (this: unknown, ...args: unknown[]) { network.push(`${name}(${args.map(String).join(', ')})`); throw new Error(`${name} is not allowed`); };
    const associated = new Map<string, (...args: unknown[]) => unknown>();
    const sandbox: Record<string, unknown> = {
      CustomFunctions: { associate: (id: string, fn: (...args: unknown[]) => unknown) => associated.set(id, fn) },
      fetch: record('fetch'), XMLHttpRequest: record('XMLHttpRequest'), WebSocket: record('WebSocket'),
      EventSource: record('EventSource'), importScripts: record('importScripts'),
      navigator: { sendBeacon: record('sendBeacon') },
    };
    // eval and new Function throw EvalError in this context: any use of them would show below
    const context = vm.createContext(sandbox, { codeGeneration: { strings: false, wasm: false } });
    vm.runInContext(readFileSync(bundlePath, 'utf8'), context);
    expect(associated.size).toBeGreaterThan(0);

    // Arguments that make each function do its real work (cards read with mathjs units, solves,
    // critical points, tables, fits); what they return does not matter here, only that nothing
    // escapes: each call returns or throws a CellFailure.
    const card = [['model', 'regular'], ['omega', 21], ['energy', 'kJ/mol'], ['temperature', '°C']];
    const args: Record<string, unknown[]> = {
      GAPLOW: [500, card], GAPHIGH: [500, card], GAPCOUNT: [500, card], SPINLOW: [500, card], SPINHIGH: [500, card],
      TCRIT: [card], XCRIT: [card], CRITKIND: [card], CRITCOUNT: [card], PHASEFRAC: [0.3, 500, card], TGAP: [0.3, card],
      GMIX: [0.3, 500, card], GAPTABLE: [300, 900, 5, card], ACTIVITY: [0.3, 500, card], ACTCOEF: [0.3, 500, card],
      CHEMPOT: [0.3, 500, card], GEXCESS: [0.3, 500, card], DRIVEFORCE: [0.3, 500, card], DECOMPGAIN: [0.3, 500, card],
      CHECKCARD: [card], FITTIELINES: [[[700, 0.1, 0.9], [800, 0.15, 0.85]], 1], FITINFO: [[[700, 0.1, 0.9], [800, 0.15, 0.85]], 1],
      FITCRIT: [1000, 0.5], FITNRTL: [300, 0.05, 0.9, 0.3], GAPRESID: [500, 0.1, card, 'low'],
      MASSFRAC: [0.3, 'H2O', 'C6H5OH'], MOLEFRAC: [0.3, 'H2O', 'C6H5OH'], WTPCT: [30, 'H2O', 'C6H5OH'], MOLPCT: [30, 'H2O', 'C6H5OH'],
      MOLARMASS: ['C6H5OH'], PHASEMASSFRAC: [0.3, 0.1, 0.9, 'H2O', 'C6H5OH'], PHASEMASS: [100, 0.3, 0.1, 0.9, 'H2O', 'C6H5OH'],
      ...Object.fromEntries(['FITMODEL', 'FITSUMMARY', 'FITRESID', 'FITCOV'].map((id) => [id, [[['model', 'rk'], ['L0', '', 'fit'], ['L0.b', '', 'fit']], [['tie-line', 700, 0.1, 0.9], ['boundary', 800, 0.2, 'low'], ['cloud point', 850, 0.3], ['critical point', 900]]]])),
    };
    // the switch works: text evaluated as code fails in this context
    expect(() => vm.runInContext('eval("1 + 1")', context)).toThrow(/Code generation from strings disallowed/);
    expect(() => vm.runInContext('new Function("return 1")', context)).toThrow(/Code generation from strings disallowed/);
    const escaped: string[] = [];
    const values = new Map<string, unknown>();
    for (const [id, fn] of associated) {
      try {
        values.set(id, fn(...(args[id] ?? [500, card])));
      } catch (e) {
        const name = (e as { name?: string })?.name;
        if (name !== 'CellFailure') escaped.push(`${id}: ${name}: ${(e as Error)?.message}`);
      }
    }
    expect(escaped).toEqual([]);
    expect(network).toEqual([]);
    // and they did their work (the card, with its units, was read and solved): 21 kJ/mol at 500 °C
    expect(typeof values.get('GAPLOW')).toBe('number');
    expect(values.get('CHECKCARD')).toMatch(/regular solution/);
    expect(Array.isArray(values.get('GAPTABLE'))).toBe(true);
    expect(values.get('FITSUMMARY')).toMatch(/^redlich-kister: L0 = /);
  });
});

describe('manifest.xml', () => {
  const doc = new DOMParser().parseFromString(readFileSync(path.join(root, 'manifest.xml'), 'utf8'), 'text/xml');
  const all = (name: string) => Array.from(doc.getElementsByTagName(name) as unknown as ArrayLike<Element>);

  it('asks for the least permission, Restricted, once', () => {
    // Office add-in permission levels, least first: Restricted, ReadDocument, ReadAllDocument,
    // WriteDocument, ReadWriteDocument (the Office add-ins manifest reference). Custom functions
    // compute from their arguments and never touch the workbook: Restricted is all they need.
    const permissions = all('Permissions').map((el) => el.textContent?.trim());
    expect(permissions).toEqual(['Restricted']);
  });

  it('names no domain besides its own (no AppDomains to navigate to)', () => {
    const domains = all('AppDomain').map((el) => el.textContent?.trim());
    expect(domains).toEqual([]);
  });
});
