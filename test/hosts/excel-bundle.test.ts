/**
 * The Excel build as the custom-functions runtime sees it: dist/functions.js run in a sandbox with
 * a stand-in `CustomFunctions` object, and dist/functions.html. Needs `npm run build` (npm test does it).
 */
import { readFileSync } from 'fs';
import path from 'path';
import vm from 'vm';
import { describe, expect, test } from 'vitest';

const dist = path.join(__dirname, '..', '..', 'dist');

describe('dist/functions.js', () => {
  test('associates exactly the ids of dist/functions.json, each with a function', () => {
    const associated: Array<[string, unknown]> = [];
    const sandbox = { CustomFunctions: { associate: (id: string, fn: unknown) => associated.push([id, fn]) } };
    vm.runInNewContext(readFileSync(path.join(dist, 'functions.js'), 'utf8'), sandbox);
    const metadata = JSON.parse(readFileSync(path.join(dist, 'functions.json'), 'utf8'));
    expect(associated.map(([id]) => id).sort()).toEqual(metadata.functions.map((f: { id: string }) => f.id).sort());
    for (const [id, fn] of associated) expect(typeof fn, id).toBe('function');
  });
});

describe('dist/functions.html', () => {
  test('loads the Office custom-functions runtime, then functions.js', () => {
    const html = readFileSync(path.join(dist, 'functions.html'), 'utf8');
    const scripts = [...html.matchAll(/<script[^>]*src="?([^"\s>]+)/g)].map((m) => m[1]);
    expect(scripts).toEqual(['https://appsforoffice.microsoft.com/lib/1/hosted/custom-functions-runtime.js', 'functions.js']);
  });
});
