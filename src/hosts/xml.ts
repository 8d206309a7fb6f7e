/**
 * The little XML an .xlsx needs, read in place: tags with their offsets in the text (so a part can
 * be patched without re-serialising it), attributes, and text with its escapes. Namespace
 * prefixes are kept in `name` and ignored by `local`.
 */

export interface Tag {
  /** Qualified name as written, e.g. `c` or `x:c`. */
  name: string;
  /** Name without its prefix. */
  local: string;
  /** Offsets of the whole tag, `<` to `>` inclusive / exclusive. */
  start: number;
  end: number;
  closing: boolean;
  selfClosing: boolean;
  /** Raw attribute text between the name and `>`. */
  attrText: string;
}

const TAG = /<!--[\s\S]*?-->|<!\[CDATA\[[\s\S]*?\]\]>|<[?!][^>]*>|<(\/?)([A-Za-z_][\w.:-]*)((?:[^>"'/]|"[^"]*"|'[^']*'|\/(?!>))*)(\/?)>/g;

/** Every element tag of `xml` from offset `from` on, in order (comments, CDATA and declarations skipped). */
export function* tags(xml: string, from = 0): Generator<Tag> {
  const re = new RegExp(TAG.source, 'g');
  re.lastIndex = from;
  for (let m = re.exec(xml); m; m = re.exec(xml)) {
    if (m[2] === undefined) continue;
    const name = m[2];
    yield {
      name,
      local: name.slice(name.indexOf(':') + 1),
      start: m.index,
      end: m.index + m[0].length,
      closing: m[1] === '/',
      selfClosing: m[4] === '/',
      attrText: m[3],
    };
  }
}

/** Attributes of a tag in document order, values unescaped, names as written. */
export function attributes(attrText: string): Array<[string, string]> {
  const out: Array<[string, string]> = [];
  const re = /([A-Za-z_][\w.:-]*)\s*=\s*("([^"]*)"|'([^']*)')/g;
  for (let m = re.exec(attrText); m; m = re.exec(attrText)) out.push([m[1], unescapeXml(m[3] ?? m[4])]);
  return out;
}

const attributePatterns = new Map<string, RegExp>();

/** One attribute by its local name (any prefix), or undefined. */
export function attribute(attrText: string, local: string): string | undefined {
  if (!attrText.includes(local)) return undefined; // the common case, without a regular expression
  let re = attributePatterns.get(local);
  if (!re) attributePatterns.set(local, (re = new RegExp(`(?:^|\\s)(?:[\\w.-]+:)?${local}\\s*=\\s*(?:"([^"]*)"|'([^']*)')`)));
  const m = re.exec(attrText);
  return m ? unescapeXml(m[1] ?? m[2]) : undefined;
}

const ENTITIES: Record<string, string> = { amp: '&', lt: '<', gt: '>', quot: '"', apos: "'" };

/** Text or attribute value with `&amp;`, `&#10;`, `&#x3C;` ... resolved. */
export function unescapeXml(s: string): string {
  if (!s.includes('&')) return s;
  return s.replace(/&(#x[0-9A-Fa-f]+|#\d+|\w+);/g, (m, e: string) => {
    if (e[0] === '#') return String.fromCodePoint(e[1] === 'x' ? parseInt(e.slice(2), 16) : parseInt(e.slice(1), 10));
    return ENTITIES[e] ?? m;
  });
}

/** Text for element content or a double-quoted attribute. */
export function escapeXml(s: string): string {
  return s.replace(/[&<>"]/g, (c) => (c === '&' ? '&amp;' : c === '<' ? '&lt;' : c === '>' ? '&gt;' : '&quot;'));
}

/**
 * Spreadsheet text (ST_Xstring): `_x000D_` stands for a character XML cannot carry or a writer chose
 * to escape. Decoded after the XML escapes.
 */
export function decodeXstring(s: string): string {
  return s.includes('_x') ? s.replace(/_x([0-9A-Fa-f]{4})_/g, (_m, h: string) => String.fromCharCode(parseInt(h, 16))) : s;
}

/** Text a cell can store: characters XML 1.0 cannot hold and literal `_xHHHH_` are escaped as ST_Xstring. */
export function encodeXstring(s: string): string {
  return escapeXml(s.replace(/_x[0-9A-Fa-f]{4}_|[\u0000-\u0008\u000B\u000C\u000E-\u001F\uFFFE\uFFFF]/g,
    (m) => (m.length > 1 ? `_x005F${m}` : `_x${m.charCodeAt(0).toString(16).toUpperCase().padStart(4, '0')}_`)));
}

/**
 * The text of the run elements (`t`) of a string item (`si` or `is`), phonetic runs (`rPh`) left out:
 * `xml` is the item's inner text.
 */
export function runText(xml: string): string {
  let out = '';
  let inPhonetic = 0;
  let textStart = -1;
  for (const t of tags(xml)) {
    if (t.local === 'rPh') {
      if (t.selfClosing) continue;
      inPhonetic += t.closing ? -1 : 1;
    } else if (t.local === 't' && !inPhonetic) {
      if (t.selfClosing) continue;
      if (!t.closing) textStart = t.end;
      else if (textStart >= 0) {
        out += decodeXstring(unescapeXml(xml.slice(textStart, t.start)));
        textStart = -1;
      }
    }
  }
  return out;
}
