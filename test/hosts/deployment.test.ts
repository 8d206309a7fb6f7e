/**
 * A build for a team's own HTTPS server: MIXGAP_BASE_URL gives the address, and every URL of the
 * add-in follows it. The web build runs here for a made-up address into a temporary folder (not
 * dist/, which the other tests read), and no file it writes may still name localhost.
 */
import { spawnSync } from 'child_process';
import { mkdtempSync, readdirSync, readFileSync, rmSync } from 'fs';
import os from 'os';
import path from 'path';
import { DOMParser } from '@xmldom/xmldom';
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
// eslint-disable-next-line @typescript-eslint/no-require-imports
const { baseAddress, manifestVersion, DEV_BASE } = require('../../src/hosts/excel/deployment.js') as {
  baseAddress: (text?: string) => string; manifestVersion: (v: string) => string; DEV_BASE: string;
};

const root = path.join(__dirname, '..', '..');
const BASE = 'https://addins.example.test/mixgap/'; // made up: .test is reserved for testing (RFC 2606)
const packageVersion = JSON.parse(readFileSync(path.join(root, 'package.json'), 'utf8')).version as string;

describe('the build setting', () => {
  test('no address: the address of npm start', () => {
    expect(baseAddress(undefined)).toBe('https://localhost:3000/');
    expect(baseAddress('  ')).toBe(DEV_BASE);
  });

  test('a folder address gets its trailing slash; the host may differ in case', () => {
    expect(baseAddress('https://addins.example.test/mixgap')).toBe(BASE);
    expect(baseAddress('https://Addins.Example.test/mixgap/')).toBe(BASE);
    expect(baseAddress('https://addins.example.test')).toBe('https://addins.example.test/');
  });

  test('what Office would not load from is refused with what to give instead', () => {
    expect(() => baseAddress('http://addins.example.test/mixgap/')).toThrow(/HTTPS only/);
    expect(() => baseAddress('addins.example.test/mixgap')).toThrow(/not a URL/);
    expect(() => baseAddress('https://addins.example.test/mixgap/?v=2')).toThrow(/without \? or #/);
  });

  test('the manifest version is the package version with a fourth part', () => {
    // Microsoft, Office Add-ins manifest reference, Version element: n to n.n.n.n, each part at most 5 digits.
    expect(manifestVersion('0.1.0')).toBe('0.1.0.0');
    expect(manifestVersion('2.10.3-rc.1')).toBe('2.10.3.0');
    expect(() => manifestVersion('2.1')).toThrow(/MAJOR.MINOR.PATCH/);
    expect(() => manifestVersion('1.0.123456')).toThrow(/at most 5 digits/);
  });
});

describe(`a build for ${BASE}`, () => {
  let out = '';
  let files: string[] = [];

  beforeAll(() => {
    out = mkdtempSync(path.join(os.tmpdir(), 'mixgap-deploy-'));
    const p = spawnSync(process.execPath, [path.join(root, 'node_modules', 'webpack-cli', 'bin', 'cli.js'),
      '--mode', 'production', '--config-name', 'web', '--output-path', out], {
      cwd: root, encoding: 'utf8', env: { ...process.env, MIXGAP_BASE_URL: BASE, WEBPACK_SERVE: '' },
    });
    expect(p.status, `${p.stdout}\n${p.stderr}`).toBe(0);
    files = (readdirSync(out, { recursive: true, withFileTypes: true }) as Array<{ isFile(): boolean; name: string; parentPath: string }>)
      .filter((d) => d.isFile()).map((d) => path.relative(out, path.join(d.parentPath, d.name)));
  }, 300_000); // a whole web build: about a minute on a loaded 2-core machine

  afterAll(() => { if (out) rmSync(out, { recursive: true, force: true }); });

  test('writes the add-in, its help pages and its manifest', () => {
    for (const f of ['functions.js', 'functions.html', 'functions.json', 'manifest.xml', 'help/index.html', 'help/GAPLOW.html', 'assets/icon-32.png']) {
      expect(files, f).toContain(f);
    }
  });

  test('no file of it names localhost', () => {
    const naming = files.filter((f) => readFileSync(path.join(out, f)).includes('localhost'));
    expect(naming).toEqual([]);
  });

  test('every URL of the manifest is on the address and names a file of the build', () => {
    const xml = readFileSync(path.join(out, 'manifest.xml'), 'utf8');
    const doc = new DOMParser().parseFromString(xml, 'text/xml');
    const urls = Array.from(doc.getElementsByTagName('*') as unknown as ArrayLike<Element>)
      .map((el) => el.getAttribute('DefaultValue')).filter((v): v is string => !!v && /^\w+:\/\//.test(v));
    // script, page, metadata, 3 icons, 2 large icons, source location, support page
    expect(urls.length).toBeGreaterThanOrEqual(10);
    for (const url of urls) {
      expect(url.startsWith(BASE), url).toBe(true);
      expect(files, url).toContain(url.slice(BASE.length));
    }
  });

  test('the manifest carries the version of package.json', () => {
    const xml = readFileSync(path.join(out, 'manifest.xml'), 'utf8');
    expect(xml).toContain(`<Version>${packageVersion}.0</Version>`);
  });

  test('every help link of functions.json is on the address and names a help page of the build', () => {
    const metadata = JSON.parse(readFileSync(path.join(out, 'functions.json'), 'utf8')) as { functions: Array<{ id: string; helpUrl?: string }> };
    expect(metadata.functions.length).toBeGreaterThan(0);
    for (const f of metadata.functions) {
      expect(f.helpUrl, f.id).toBe(`${BASE}help/${f.id}.html`);
      expect(files).toContain(`help/${f.id}.html`);
    }
  });
});
