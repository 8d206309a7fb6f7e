/**
 * The launcher's code cache (bin/mixgap.js): on a copy of the built command, the first run leaves
 * FILE.js.cache beside the bundle files it loaded, keyed by the SHA-1 of the file's text and of the
 * node version; later runs give the same answers from it; a damaged cache or a changed file is
 * never used, and is written again. Expected answers are the formulas' arithmetic (common
 * practice, no published source).
 */
import { spawnSync } from 'child_process';
import { createHash } from 'crypto';
import { appendFileSync, copyFileSync, existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, symlinkSync, writeFileSync } from 'fs';
import os from 'os';
import path from 'path';
import { afterAll, beforeAll, describe, expect, test } from 'vitest';

const root = path.join(__dirname, '..', '..');
let copy: string;

beforeAll(() => {
  copy = mkdtempSync(path.join(os.tmpdir(), 'mixgap-cache-'));
  mkdirSync(path.join(copy, 'bin'));
  mkdirSync(path.join(copy, 'dist', 'node'), { recursive: true });
  copyFileSync(path.join(root, 'bin', 'mixgap.js'), path.join(copy, 'bin', 'mixgap.js'));
  copyFileSync(path.join(root, 'dist', 'functions.json'), path.join(copy, 'dist', 'functions.json'));
  for (const f of readdirSync(path.join(root, 'dist', 'node'))) {
    if (f.endsWith('.js')) copyFileSync(path.join(root, 'dist', 'node', f), path.join(copy, 'dist', 'node', f));
  }
  symlinkSync(path.join(root, 'node_modules'), path.join(copy, 'node_modules'), 'dir');
});

afterAll(() => rmSync(copy, { recursive: true, force: true }));

const run = () => spawnSync(process.execPath, [path.join(copy, 'bin', 'mixgap.js'), 'eval', '=SUM(1, 2)*7'], { encoding: 'utf8' });
const cacheOf = (file: string) => path.join(copy, 'dist', 'node', `${file}.cache`);
const keyOf = (file: string) => createHash('sha1').update(readFileSync(path.join(copy, 'dist', 'node', file), 'utf8')).update(process.version).digest();

describe('code cache of the command', () => {
  test('the first run writes it, keyed by the file and node; the next runs answer the same from it', () => {
    expect(existsSync(cacheOf('cli.js'))).toBe(false);
    const first = run();
    expect(first.stdout.trim()).toBe('21');
    const cache = readFileSync(cacheOf('cli.js'));
    expect(cache.subarray(0, 20).equals(keyOf('cli.js'))).toBe(true);
    expect(cache.length).toBeGreaterThan(20);
    const second = run();
    expect(second.stdout.trim()).toBe('21');
    expect(second.stderr).toBe('');
    expect(readFileSync(cacheOf('cli.js')).equals(cache)).toBe(true); // used, not written again
  });

  test('a damaged cache is not used and is written again', () => {
    const key = keyOf('cli.js');
    writeFileSync(cacheOf('cli.js'), Buffer.concat([key, Buffer.from('not a code cache')]));
    const r = run();
    expect(r.stdout.trim()).toBe('21');
    expect(r.stderr).toBe('');
    const again = readFileSync(cacheOf('cli.js'));
    expect(again.subarray(0, 20).equals(key)).toBe(true);
    expect(again.subarray(20).toString('latin1')).not.toBe('not a code cache');
  });

  test('a changed file is compiled anew, and its cache follows it', () => {
    appendFileSync(path.join(copy, 'dist', 'node', 'cli.js'), '\n// changed\n');
    const r = run();
    expect(r.stdout.trim()).toBe('21');
    expect(readFileSync(cacheOf('cli.js')).subarray(0, 20).equals(keyOf('cli.js'))).toBe(true);
  });
});
