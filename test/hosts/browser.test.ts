/**
 * The Excel build in a real browser: dist/ served over http on 127.0.0.1, functions.html opened in
 * headless Chromium (Debian's /usr/bin/chromium driven by playwright-core; `apt-get install -y
 * chromium`), with a stand-in for the Office custom-functions runtime script (its request is
 * intercepted; nothing leaves the machine). Every function of functions.json must be associated
 * under its id, and give inside the browser the same values and errors as the same functions called
 * in Node. Errors and texts must match exactly; numbers (also those inside messages) to a relative
 * 1e-9: the browser's V8 and Node's differ in the last bits of some Math functions (differences of a
 * few ulp, about 1e-16, were measured here for XCRIT and SPINHIGH), and the iterative solves carry
 * such differences on, bounded by their own convergence tolerances, which are far below 1e-9. A
 * wrong argument, unit or branch changes a result by far more than that.
 */
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'fs';
import http from 'http';
import type { AddressInfo } from 'net';
import os from 'os';
import path from 'path';
import { chromium } from 'playwright-core';
import type { BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import * as fns from '../../src/functions/index';

const root = path.join(__dirname, '..', '..');
const dist = path.join(root, 'dist');
const CHROMIUM = '/usr/bin/chromium';
const RUNTIME_URL = 'https://appsforoffice.microsoft.com/lib/1/hosted/custom-functions-runtime.js';

interface Meta { id: string; name: string; parameters: Array<{ name: string; type: string; dimensionality?: string; optional?: boolean }> }
const metadata = JSON.parse(readFileSync(path.join(dist, 'functions.json'), 'utf8')) as { functions: Meta[] };

/** Stand-in for the Office runtime: records associations and makes errors as CustomFunctions does. */
const FAKE_RUNTIME = `
window.__associated = {};
window.CustomFunctions = {
  associate: function (id, fn) {
    if (typeof id === 'object') { for (var k in id) window.__associated[k] = id[k]; }
    else window.__associated[id] = fn;
  },
  ErrorCode: { invalidValue: '#VALUE!', notAvailable: '#N/A', divisionByZero: '#DIV/0!', invalidNumber: '#NUM!',
               nullReference: '#NULL!', invalidName: '#NAME?', invalidReference: '#REF!' },
  Error: function (code, message) { this.code = code; this.message = message; },
};`;

/** A result as plain data: numbers, texts, {error, message} for errors (also inside tables). */
type Plain = unknown;
function plain(v: unknown): Plain {
  if (Array.isArray(v)) return v.map(plain);
  if (v && typeof v === 'object' && 'code' in v) return { error: (v as { code: string }).code, message: (v as { message?: string }).message };
  if (typeof v === 'number' && !Number.isFinite(v)) return { nonFinite: String(v) };
  return v;
}

/** Calls a function in Node the way the runtime does; a thrown failure becomes its error. */
function inNode(id: string, args: unknown[]): Plain {
  const fn = Object.entries(fns).find(([name]) => name.toUpperCase() === id)?.[1] as ((...a: unknown[]) => unknown) | undefined;
  if (!fn) return { missing: id };
  try {
    return plain(fn(...args));
  } catch (e) {
    return plain(e);
  }
}

const TOLERANCE = 1e-9;
const NUMBER = /-?\d+(?:\.\d+)?(?:e[+-]?\d+)?/gi;

/** Whether two results agree: same structure, texts and error codes; numbers to TOLERANCE. */
function agree(a: unknown, b: unknown): boolean {
  if (typeof a === 'number' && typeof b === 'number') return Math.abs(a - b) <= TOLERANCE * Math.max(1, Math.abs(a), Math.abs(b));
  if (typeof a === 'string' && typeof b === 'string') {
    const na = a.match(NUMBER) ?? [], nb = b.match(NUMBER) ?? [];
    return a.replace(NUMBER, '#') === b.replace(NUMBER, '#') && na.length === nb.length
      && na.every((v, i) => agree(Number(v), Number(nb[i])));
  }
  if (Array.isArray(a) || Array.isArray(b)) {
    return Array.isArray(a) && Array.isArray(b) && a.length === b.length && a.every((v, i) => agree(v, b[i]));
  }
  if (a && b && typeof a === 'object' && typeof b === 'object') {
    const ka = Object.keys(a).sort(), kb = Object.keys(b).sort();
    return JSON.stringify(ka) === JSON.stringify(kb) && ka.every((k) => agree((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k]));
  }
  return a === b;
}

function inBrowser(page: Page, id: string, args: unknown[]): Promise<Plain> {
  return page.evaluate(({ id, args }) => {
    const simple = (v: unknown): unknown => {
      if (Array.isArray(v)) return v.map(simple);
      if (v && typeof v === 'object' && 'code' in v) return { error: (v as { code: string }).code, message: (v as { message?: string }).message };
      if (typeof v === 'number' && !Number.isFinite(v)) return { nonFinite: String(v) };
      return v;
    };
    const fn = (window as unknown as { __associated: Record<string, (...a: unknown[]) => unknown> }).__associated[id];
    if (!fn) return { missing: id };
    try {
      return simple(fn(...args));
    } catch (e) {
      return simple(e);
    }
  }, { id, args });
}

const card = [['model', 'regular'], ['omega', 21], ['energy', 'kJ/mol'], ['temperature', '°C'], ['name A', 'Avarite'], ['name B', 'Bexium']];
const nrtlCard = [['model', 'nrtl'], ['a12', 0], ['b12', 900], ['a21', 0], ['b21', 600], ['alpha', 0.3]];

/** Inputs chosen per function: numbers, cards, and cases that must give errors. */
const CASES: Array<[string, unknown[]]> = [
  ['GAPLOW', [800, [[21000]]]],
  ['GAPHIGH', [800, [[21000, 0, 0], [3000, 0, 0]]]],
  ['GAPLOW', [600, card]],
  ['GAPLOW', [5000, [[21000]]]], // above the critical point: #N/A
  ['GAPLOW', [-5, [[21000]]]], // below absolute zero: #NUM!
  ['GAPLOW', [800, [['model', 'no such model']]]], // a card that cannot be read: #VALUE!
  ['SPINLOW', [700, card]],
  ['SPINHIGH', [700, card]],
  ['TCRIT', [card]],
  ['XCRIT', [[[21000, 0, 0], [3000, 0, 0]]]],
  ['CRITKIND', [card]],
  ['CRITCOUNT', [nrtlCard]],
  ['PHASEFRAC', [0.3, 600, card, 'low']],
  ['TGAP', [0.2, card]],
  ['GMIX', [0.4, 900, card]],
  ['GAPTABLE', [300, 1100, 9, card]], // spills, with #N/A cells above the critical point
  ['ACTIVITY', [0.3, 700, card, 'Avarite']],
  ['CHECKCARD', [card]],
  ['CHECKCARD', [nrtlCard]],
  // UNCERTAINTY calls other functions: their errors come back as the runtime's error objects
  ['UNCERTAINTY', ['TCRIT', [...card, ['u(omega)', 0.2]]]],
  ['UNCERTAINTY', ['GAPLOW', [[600]], [...card, ['u(omega)', 0.2]]]],
  ['UNCERTAINTY', ['GAPLOW', [[1100]], [...card, ['u(omega)', 0.2]]]], // above the critical point: its #N/A
  ['UNCERTAINTY', ['GAPLOW', [[985]], [...card, ['u(omega)', 0.2]]]], // the gap closes within the band: #N/A
  ['GAPBAND', [300, 1100, 5, [...card, ['u(omega)', 0.2]]]],
];

/** A generic call for every function, built from its parameters, so none is left unexercised. */
function genericArgs(f: Meta): unknown[] {
  const args = f.parameters.filter((p) => !p.optional).map((p) => {
    if (p.dimensionality === 'matrix') return card;
    if (p.type === 'number') return /^t/i.test(p.name) ? 650 : 0.3;
    if (p.type === 'string') return 'B';
    return 0.3;
  });
  return args;
}

let server: http.Server;
let origin: string;
let context: BrowserContext;
let page: Page;
let profile: string;
let home: string;
const outside: string[] = [];

const TYPES: Record<string, string> = { '.html': 'text/html', '.js': 'text/javascript', '.json': 'application/json', '.png': 'image/png' };

beforeAll(async () => {
  if (!existsSync(CHROMIUM)) throw new Error(`${CHROMIUM} not found: install it with \`apt-get install -y chromium\``);
  // dist/ over http on 127.0.0.1 (the browser test needs no certificate).
  server = http.createServer((req, res) => {
    const rel = decodeURIComponent(new URL(req.url ?? '/', 'http://x').pathname).replace(/^\/+/, '');
    const file = path.join(dist, rel);
    if (!file.startsWith(dist) || !existsSync(file)) {
      res.writeHead(404).end();
      return;
    }
    res.writeHead(200, { 'Content-Type': TYPES[path.extname(file)] ?? 'application/octet-stream' }).end(readFileSync(file));
  });
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  origin = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;

  profile = mkdtempSync(path.join(os.tmpdir(), 'mixgap-chromium-'));
  home = mkdtempSync(path.join(os.tmpdir(), 'mixgap-home-'));
  context = await chromium.launchPersistentContext(profile, {
    executablePath: CHROMIUM,
    headless: true,
    args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--no-first-run'],
    env: { ...process.env, HOME: home },
  });
  page = context.pages()[0] ?? await context.newPage();
  await page.route('**/*', (route) => {
    const url = route.request().url();
    if (url === RUNTIME_URL) return route.fulfill({ contentType: 'text/javascript', body: FAKE_RUNTIME });
    if (url.startsWith(origin)) return route.continue();
    outside.push(url);
    return route.abort();
  });
  const errors: string[] = [];
  page.on('pageerror', (e) => errors.push(e.message));
  await page.goto(`${origin}/functions.html`, { waitUntil: 'load' });
  expect(errors).toEqual([]);
}, 90_000);

afterAll(async () => {
  await context?.close();
  await new Promise<void>((resolve) => (server ? server.close(() => resolve()) : resolve()));
  for (const dir of [profile, home]) if (dir) rmSync(dir, { recursive: true, force: true });
});

describe('functions.html in headless Chromium', () => {
  test('every function of functions.json is associated under its id', async () => {
    const ids = await page.evaluate(() => Object.keys((window as unknown as { __associated: object }).__associated));
    expect(ids.sort()).toEqual(metadata.functions.map((f) => f.id).sort());
    const kinds = await page.evaluate(() => Object.values((window as unknown as { __associated: object }).__associated).map((f) => typeof f));
    expect(new Set(kinds)).toEqual(new Set(['function']));
  });

  test('chosen inputs give the same values and errors as in Node', async () => {
    for (const [id, args] of CASES) {
      const expected = inNode(id, args);
      expect(expected, `${id} exists in Node`).not.toEqual({ missing: id });
      const got = await inBrowser(page, id, args);
      expect(agree(got, expected), `${id}(${JSON.stringify(args)}):\n browser ${JSON.stringify(got)}\n node    ${JSON.stringify(expected)}`).toBe(true);
    }
    // The cases do include errors of each kind and a table with error cells.
    const seen = JSON.stringify(CASES.map(([id, args]) => inNode(id, args)));
    for (const code of ['#N/A', '#NUM!', '#VALUE!']) expect(seen).toContain(`"error":"${code}"`);
  }, 60_000);

  test('every function, called with generic arguments, agrees with Node', async () => {
    for (const f of metadata.functions) {
      const args = genericArgs(f);
      const got = await inBrowser(page, f.id, args), expected = inNode(f.id, args);
      expect(expected, `${f.id} exists in Node`).not.toEqual({ missing: f.id });
      expect(agree(got, expected), `${f.id}(${JSON.stringify(args)}):\n browser ${JSON.stringify(got)}\n node    ${JSON.stringify(expected)}`).toBe(true);
    }
  }, 60_000);

  test('the comparison tells different results apart', () => {
    expect(agree(0.40456678405103624, 0.4045667840510363)).toBe(true); // a few ulp, as measured
    expect(agree(0.4045, 0.4046)).toBe(false);
    expect(agree({ error: '#N/A', message: 'no gap at T = 5000 K' }, { error: '#NUM!', message: 'no gap at T = 5000 K' })).toBe(false);
    expect(agree('no gap at T = 5000 K', 'no gap at T = 5001 K')).toBe(false);
    expect(agree([[1, { error: '#N/A', message: 'x' }]], [[1, 2]])).toBe(false);
  });

  test('nothing was fetched from outside the machine', () => {
    expect(outside).toEqual([]);
  });
});
