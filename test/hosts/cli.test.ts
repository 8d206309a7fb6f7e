/**
 * The `mixgap` command as a user runs it: `node bin/mixgap.js ...` on the built bundle
 * (`npm test` builds first). Formulas here use built-in functions, so the expected values are
 * computed in the test by the same IEEE doubles; the Mixgap functions are checked by
 * ../shared/checks/cli-contract.py and test/functions.
 */
import { spawnSync } from 'child_process';
import { copyFileSync, existsSync, mkdirSync, mkdtempSync, readFileSync } from 'fs';
import os from 'os';
import path from 'path';
import { describe, expect, test } from 'vitest';

const root = path.join(__dirname, '..', '..');
const bin = path.join(root, 'bin', 'mixgap.js');

function mixgap(args: string[], input?: string) {
  const p = spawnSync(process.execPath, [bin, ...args], { input, encoding: 'utf8', cwd: root });
  return { status: p.status, stdout: p.stdout, stderr: p.stderr };
}

describe('mixgap eval', () => {
  test('the bundle is built', () => {
    expect(existsSync(path.join(root, 'dist', 'node', 'cli.js')), 'run `npm run build`').toBe(true);
  });

  test('a spilled result given as an argument comes back as a 2-D array', () => {
    const r = mixgap(['eval', '--json', '=SEQUENCE(3, 2)']);
    expect(r.status).toBe(0);
    expect(JSON.parse(r.stdout)).toEqual([[[1, 2], [3, 4], [5, 6]]]);
  });

  test('formulas on standard input, one per line, blank lines skipped', () => {
    const r = mixgap(['eval', '--json'], '=1/3\n\n=1/0\nSUM(1, 2)\n   \n="a"&"b"\n=SEQUENCE(1, 3, 0.1, 0.2)\n');
    expect(r.status).toBe(0);
    const got = JSON.parse(r.stdout);
    expect(got).toHaveLength(5);
    expect(got[0]).toBe(1 / 3); // exact: JSON keeps the shortest round-trip digits
    expect(got[1]).toEqual({ error: '#DIV/0!', message: expect.stringMatching(/\S/) });
    expect(got[2]).toBe(3); // a formula typed without "=" is still evaluated
    expect(got[3]).toBe('ab');
    expect(got[4]).toEqual([[0.1, 0.1 + 0.2, 0.1 + 2 * 0.2]]);
  });

  test('several formulas as arguments give one entry each, in order', () => {
    const r = mixgap(['eval', '--json', '=2^0.5', '=SEQUENCE(2)', '=NOSUCHFUNCTION(1)']);
    expect(r.status).toBe(0);
    const got = JSON.parse(r.stdout);
    expect(got[0]).toBe(2 ** 0.5);
    expect(got[1]).toEqual([[1], [2]]);
    expect(got[2]).toEqual({ error: '#NAME?', message: expect.stringContaining('NOSUCHFUNCTION') });
  });

  test('plain output: one line per formula, full precision, errors with their message', () => {
    const r = mixgap(['eval'], '=1/3\n=SEQUENCE(3, 2)\n=1/0\n=1+\n');
    expect(r.status).toBe(0);
    const lines = r.stdout.split('\n');
    expect(lines.pop()).toBe(''); // output ends with a newline
    expect(lines).toHaveLength(4);
    expect(Number(lines[0])).toBe(1 / 3);
    expect(lines[1]).toBe('1, 2; 3, 4; 5, 6');
    expect(lines[2]).toMatch(/^#DIV\/0! {2}\S/);
    expect(lines[3]).toMatch(/^#ERROR! {2}\S/); // a parse error's multi-line message is kept on one line
  });

  test('usage errors exit non-zero and print nothing on standard output', () => {
    for (const args of [['eval', '--no-such-option'], ['no-such-command'], []]) {
      const r = mixgap(args);
      expect(r.status, args.join(' ')).not.toBe(0);
      expect(r.stdout, args.join(' ')).toBe('');
    }
  });

  test('--help describes the output and exits 0', () => {
    const r = mixgap(['eval', '--help']);
    expect(r.status).toBe(0);
    expect(r.stdout).toContain('--json');
    expect(r.stdout).toContain('Plain output');
  });
});

describe('mixgap functions', () => {
  test('lists every function of the built metadata under the MIXGAP namespace', () => {
    const metadata = JSON.parse(readFileSync(path.join(root, 'dist', 'functions.json'), 'utf8'));
    const r = mixgap(['functions']);
    expect(r.status).toBe(0);
    const signatures = r.stdout.split('\n').filter((line) => line !== '' && !line.startsWith(' '));
    const names = signatures.map((line) => line.slice(0, line.indexOf('(')));
    expect(names).toEqual(metadata.functions.map((f: { name: string }) => `MIXGAP.${f.name}`));
  });
});

describe('mixgap --version', () => {
  test('prints the version of package.json and exits 0', () => {
    const { version } = JSON.parse(readFileSync(path.join(root, 'package.json'), 'utf8'));
    for (const flag of ['--version', '-V']) {
      const r = mixgap([flag]);
      expect(r.status, flag).toBe(0);
      expect(r.stdout, flag).toBe(`${version}\n`);
    }
  });
});

describe('bin/mixgap.js without a build', () => {
  test('says to run the build and exits 2', () => {
    const dir = mkdtempSync(path.join(os.tmpdir(), 'mixgap-nobuild-'));
    mkdirSync(path.join(dir, 'bin'));
    copyFileSync(bin, path.join(dir, 'bin', 'mixgap.js'));
    const p = spawnSync(process.execPath, [path.join(dir, 'bin', 'mixgap.js'), 'eval', '=1'], { encoding: 'utf8' });
    expect(p.status).toBe(2);
    expect(p.stderr).toContain('run `npm run build` first');
  });
});
