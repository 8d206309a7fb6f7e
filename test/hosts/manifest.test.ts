/**
 * Offline checks of manifest.xml (the online validator is out of reach here): it parses, every
 * resid it uses is defined, every URL it names is a file the build puts in dist/, and the namespace
 * is the one the embedded engine uses; the copy the build writes to dist/ carries the version of
 * package.json. Also the help pages: every function of functions.json has one in dist/help/, and
 * every helpUrl of functions.json names a file of the build. (A build for another address:
 * deployment.test.ts.)
 */
import { existsSync, readFileSync } from 'fs';
import path from 'path';
import { DOMParser } from '@xmldom/xmldom';
import { describe, expect, test } from 'vitest';
import { NAMESPACE } from '../../src/hosts/engine';

const root = path.join(__dirname, '..', '..');
const BT = 'http://schemas.microsoft.com/office/officeappbasictypes/1.0';
const DEV_ORIGIN = 'https://localhost:3000/';

const errors: string[] = [];
const doc = new DOMParser({ onError: (level, message) => { errors.push(`${level}: ${message}`); } })
  .parseFromString(readFileSync(path.join(root, 'manifest.xml'), 'utf8'), 'text/xml');

function all(name: string): Element[] {
  return Array.from(doc.getElementsByTagName(name) as unknown as ArrayLike<Element>);
}

describe('manifest.xml', () => {
  test('parses without warnings', () => {
    expect(errors).toEqual([]);
    expect(doc.documentElement!.getAttribute('xsi:type')).toBe('TaskPaneApp');
  });

  test('has its own id, names Mixgap and asks for the least permission', () => {
    expect(all('Id')[0].textContent).toMatch(/^[0-9a-f]{8}-[0-9a-f]{4}-4[0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$/);
    expect(all('ProviderName')[0].textContent).toBe('Mixgap');
    expect(all('DisplayName')[0].getAttribute('DefaultValue')).toBe('Mixgap');
    expect(all('Permissions')[0].textContent).toBe('Restricted');
  });

  test('every resid used is defined once among the resources', () => {
    const defined = new Map<string, string>();
    for (const tag of ['Image', 'Url', 'String']) {
      for (const el of Array.from(doc.getElementsByTagNameNS(BT, tag) as unknown as ArrayLike<Element>)) {
        expect(defined.has(el.getAttribute('id')!), el.getAttribute('id')!).toBe(false);
        defined.set(el.getAttribute('id')!, el.getAttribute('DefaultValue')!);
      }
    }
    const used = all('*').map((el) => el.getAttribute('resid')).filter((r): r is string => !!r);
    expect(used.length).toBeGreaterThanOrEqual(4); // script, page, metadata, namespace
    for (const r of used) expect(defined.has(r), r).toBe(true);
    const namespace = all('Namespace')[0].getAttribute('resid')!;
    expect(defined.get(namespace)).toBe(NAMESPACE);
  });

  test('every URL names a file of the build', () => {
    const urls = all('*').map((el) => el.getAttribute('DefaultValue'))
      .filter((v): v is string => !!v && v.startsWith('https://'));
    expect(urls.length).toBeGreaterThan(0);
    for (const url of urls) {
      expect(url.startsWith(DEV_ORIGIN), url).toBe(true);
      const file = path.join(root, 'dist', url.slice(DEV_ORIGIN.length));
      expect(existsSync(file), `${url} -> ${file} (run \`npm run build\`)`).toBe(true);
    }
  });

  test('the copy in dist/ is this manifest with the version of package.json', () => {
    const built = readFileSync(path.join(root, 'dist', 'manifest.xml'), 'utf8');
    const { version } = JSON.parse(readFileSync(path.join(root, 'package.json'), 'utf8'));
    // Microsoft, Office Add-ins manifest reference, Version element: n to n.n.n.n.
    expect(built).toContain(`<Version>${version}.0</Version>`);
    const withoutVersionAndComment = (xml: string) => xml.replace(/<Version>[^<]*<\/Version>/, '').replace(/<!--[\s\S]*?-->/, '');
    // The same manifest otherwise, for the address of that build (the development one unless MIXGAP_BASE_URL was set).
    const base = /<SourceLocation DefaultValue="([^"]*)functions\.html"/.exec(built)![1];
    expect(withoutVersionAndComment(built)).toBe(withoutVersionAndComment(readFileSync(path.join(root, 'manifest.xml'), 'utf8')).split(DEV_ORIGIN).join(base));
  });

  test('the custom-functions extension point names the three runtime files', () => {
    const point = all('ExtensionPoint').find((el) => el.getAttribute('xsi:type') === 'CustomFunctions')!;
    expect(point).toBeDefined();
    const resid = (tag: string) => (point.getElementsByTagName(tag)[0] as Element)
      .getElementsByTagName('SourceLocation')[0].getAttribute('resid');
    const url = (id: string | null) => Array.from(doc.getElementsByTagNameNS(BT, 'Url') as unknown as ArrayLike<Element>)
      .find((el) => el.getAttribute('id') === id)!.getAttribute('DefaultValue');
    expect(url(resid('Script'))).toBe(`${DEV_ORIGIN}functions.js`);
    expect(url(resid('Page'))).toBe(`${DEV_ORIGIN}functions.html`);
    expect(url(resid('Metadata'))).toBe(`${DEV_ORIGIN}functions.json`);
  });
});

describe('help pages', () => {
  const metadata = JSON.parse(readFileSync(path.join(root, 'dist', 'functions.json'), 'utf8')) as {
    functions: Array<{ id: string; name: string; helpUrl?: string; parameters: Array<{ name: string; description?: string }> }>;
  };

  test('every function has dist/help/<ID>.html naming it and describing each of its parameters', () => {
    expect(metadata.functions.length).toBeGreaterThan(0);
    for (const f of metadata.functions) {
      const file = path.join(root, 'dist', 'help', `${f.id.toUpperCase()}.html`);
      expect(existsSync(file), file).toBe(true);
      // The page's text with the entities the generator or the HTML minifier may use decoded.
      const html = readFileSync(file, 'utf8').replace(/&quot;/g, '"').replace(/&#39;/g, "'")
        .replace(/&lt;/g, '<').replace(/&gt;/g, '>').replace(/&amp;/g, '&');
      expect(html).toContain(`${NAMESPACE}.${f.name}`);
      for (const p of f.parameters) {
        expect(html, `${f.id}: parameter ${p.name}`).toContain(`<code>${p.name}</code>`);
        expect(html, `${f.id}: description of ${p.name}`).toContain(p.description ?? '');
      }
    }
    expect(existsSync(path.join(root, 'dist', 'help', 'index.html'))).toBe(true);
  });

  test('every helpUrl in functions.json names a file of the build', () => {
    // The address the build was for (the development one unless MIXGAP_BASE_URL was set).
    const built = readFileSync(path.join(root, 'dist', 'manifest.xml'), 'utf8');
    const base = /<SourceLocation DefaultValue="([^"]*)functions\.html"/.exec(built)![1];
    const withHelp = metadata.functions.filter((f) => f.helpUrl !== undefined);
    expect(withHelp.length).toBe(metadata.functions.length);
    for (const f of withHelp) {
      const url = f.helpUrl!;
      expect(url.startsWith(base), `${f.id}: ${url}`).toBe(true);
      const file = path.join(root, 'dist', decodeURIComponent(url.slice(base.length).split(/[?#]/)[0]));
      expect(existsSync(file), `${f.id}: ${url} -> ${file}`).toBe(true);
    }
  });
});
