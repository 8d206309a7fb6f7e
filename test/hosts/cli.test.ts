/**
 * The `mixgap` command as a user runs it: `node bin/mixgap.js ...` on the built bundle
 * (`npm test` builds first). Formulas here use built-in functions, so the expected values are
 * computed in the test by the same IEEE doubles; the Mixgap functions are checked by
 * ../shared/checks/cli-contract.py and test/functions.
 */
import { spawnSync } from 'child_process';
import { copyFileSync, existsSync, mkdirSync, mkdtempSync, readFileSync, writeFileSync } from 'fs';
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

describe('mixgap eval: formulas as typed in other Excel languages', () => {
  // Where "," is the decimal comma (German, French, ...), Excel separates arguments with ";"
  // (from memory: Microsoft Excel help on the list separator of the regional settings).
  test('";" between arguments is read as ","; ";" in strings and between array rows is kept', () => {
    const r = mixgap(['eval', '--json', '=SUM(1;2)', '=MIXGAP.GAPLOW(800; 21000)', '=MIXGAP.GAPLOW(800, 21000)', '="a;b"', '={1,2;3,4}']);
    expect(r.status).toBe(0);
    const [sum, semicolons, commas, text, array] = JSON.parse(r.stdout);
    expect(sum).toBe(3);
    expect(typeof commas).toBe('number');
    expect(semicolons).toBe(commas); // the same formula, either separator
    expect(text).toBe('a;b');
    expect(array).toEqual([[1, 2], [3, 4]]);
  });

  test('";" with a decimal comma is not guessed at: the message says to write "," and "."', () => {
    const r = mixgap(['eval', '=MIXGAP.GAPLOW(800; 21000,5)']);
    expect(r.status).toBe(0);
    expect(r.stdout).toMatch(/^#ERROR! {2}.*write "," between arguments and "\." as the decimal point/);
  });

  test('a Mixgap function without its namespace gives #NAME? saying to add MIXGAP.', () => {
    const r = mixgap(['eval', '--json', '=GAPLOW(800, 21000)', '=NOSUCHFUNCTION(1)']);
    expect(r.status).toBe(0);
    const [missing, unknown] = JSON.parse(r.stdout);
    expect(missing).toEqual({ error: '#NAME?', message: expect.stringContaining('MIXGAP.GAPLOW(') });
    expect(unknown.error).toBe('#NAME?');
    expect(unknown.message).not.toContain('MIXGAP.'); // no hint where there is no such Mixgap function
  });
});

describe('mixgap diagram: errors that say what to do', () => {
  const dir = mkdtempSync(path.join(os.tmpdir(), 'mixgap-diagram-errors-'));
  const card = path.join(dir, 'card.csv');
  // Invented card: a regular solution, Omega = 21 kJ/mol.
  writeFileSync(card, 'model,regular\nomega,21\nenergy,kJ/mol\n');

  test('--temperature-unit F blames the option, not the card', () => {
    const r = mixgap(['diagram', card, '--temperature-unit', 'F', '-o', `${dir}/`]);
    expect(r.status).toBe(1);
    expect(r.stderr).toContain("option '--temperature-unit <unit>' argument 'F' is invalid");
    expect(r.stderr).toContain('write K or °C');
    const firstLine = r.stderr.split('\n')[0]; // the help of the subcommand follows
    expect(firstLine).toContain('write K or °C');
    expect(firstLine).not.toMatch(/card/i);
    expect(r.stderr).not.toContain('not usable');
    expect(existsSync(path.join(dir, 'card.diagram.svg'))).toBe(false);
  });

  test('a mark without the MIXGAP. namespace says to add it; a mark with ";" between arguments is read', () => {
    const missing = mixgap(['diagram', card, '--mark', 'GAPLOW(800, 21000)', '-o', `${dir}/`]);
    expect(missing.status).toBe(1);
    expect(missing.stderr).toContain('MIXGAP.GAPLOW(');
    const read = mixgap(['diagram', card, '--mark', 'SUM(0.1; 0.2)', '-o', `${dir}/`]);
    expect(read.stderr).toBe('');
    expect(read.status).toBe(0);
    expect(read.stdout).toContain('1 marked composition');
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
