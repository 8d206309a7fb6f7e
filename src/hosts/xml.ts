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

/** Every element tag of `xml` from offset `from` on, in order (comments, CDATA and declarations skipped): TagCursor's tags as objects. */
export function* tags(xml: string, from = 0): Generator<Tag> {
  const t = new TagCursor(xml, from);
  while (t.next()) {
    const name = t.name;
    // (local from the first colon, as this has always read a name with two, which XML does not allow)
    yield { name, local: name.slice(name.indexOf(':') + 1), start: t.start, end: t.end, closing: t.closing, selfClosing: t.selfClosing, attrText: t.attrText };
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

/**
 * The element tags of a text one at a time (comments, CDATA sections, declarations and processing
 * instructions skipped; a `<` that starts no well-formed tag, such as one with an unclosed quote, is
 * passed over), without an object or a string per tag: `next()` moves to the next tag and the
 * fields describe it by offsets. The big parts (a worksheet of a hundred thousand cells) are read
 * with it directly; `tags` makes objects of its tags for the small ones.
 */
export class TagCursor {
  /** Offsets of the whole tag, `<` to `>` inclusive / exclusive. */
  start = 0;
  end = 0;
  /** The qualified name is xml[nameStart, nameEnd); the local name starts at localStart. */
  nameStart = 0;
  nameEnd = 0;
  localStart = 0;
  /** The raw attribute text is xml[nameEnd, attrEnd). */
  attrEnd = 0;
  closing = false;
  selfClosing = false;

  constructor(public xml: string, private pos = 0) {}

  /** The cursor moved to offset `pos` of `xml` (one cursor used again for many short reads). */
  at(xml: string, pos: number): this {
    this.xml = xml;
    this.pos = pos;
    return this;
  }

  /** Moves to the next element tag; false at the end of the text. */
  next(): boolean {
    const x = this.xml;
    let i = this.pos;
    for (;;) {
      const lt = x.indexOf('<', i);
      if (lt < 0) {
        this.pos = x.length;
        return false;
      }
      const c1 = x.charCodeAt(lt + 1);
      if (c1 === 33 /* ! */ || c1 === 63 /* ? */) {
        // A comment or CDATA section to its end; another declaration or instruction to the next `>`.
        let e = -1;
        if (x.startsWith('!--', lt + 1) && (e = x.indexOf('-->', lt + 4)) >= 0) i = e + 3;
        else if (x.startsWith('![CDATA[', lt + 1) && (e = x.indexOf(']]>', lt + 9)) >= 0) i = e + 3;
        else if ((e = x.indexOf('>', lt + 2)) >= 0) i = e + 1;
        else i = lt + 1;
        continue;
      }
      if (this.element(lt)) return true;
      i = lt + 1; // not a tag (a stray `<`, an unclosed quote): look further
    }
  }

  /** Reads the element tag at `lt`; false when there is none. */
  private element(lt: number): boolean {
    const x = this.xml;
    let j = lt + 1;
    const closing = x.charCodeAt(j) === 47; // '/'
    if (closing) j++;
    if (!isNameStart(x.charCodeAt(j))) return false;
    const nameStart = j;
    let localStart = j;
    for (j++; ; j++) {
      const c = x.charCodeAt(j);
      if (c === 58 /* : */) localStart = j + 1;
      else if (!isNameChar(c)) break;
    }
    const nameEnd = j;
    for (;;) {
      const c = x.charCodeAt(j);
      if (c === 62 /* > */) {
        this.set(lt, j + 1, nameStart, nameEnd, localStart, j, closing, false);
        return true;
      }
      if (c === 34 /* " */ || c === 39 /* ' */) {
        const q = x.indexOf(c === 34 ? '"' : "'", j + 1);
        if (q < 0) return false;
        j = q + 1;
      } else if (c === 47 /* / */ && x.charCodeAt(j + 1) === 62) {
        this.set(lt, j + 2, nameStart, nameEnd, localStart, j, closing, true);
        return true;
      } else if (Number.isNaN(c)) {
        return false;
      } else {
        j++;
      }
    }
  }

  private set(start: number, end: number, nameStart: number, nameEnd: number, localStart: number, attrEnd: number, closing: boolean, selfClosing: boolean): void {
    this.start = start;
    this.end = end;
    this.nameStart = nameStart;
    this.nameEnd = nameEnd;
    this.localStart = localStart;
    this.attrEnd = attrEnd;
    this.closing = closing;
    this.selfClosing = selfClosing;
    this.pos = end;
  }

  /** Whether the tag's local name is `local`. */
  is(local: string): boolean {
    return this.nameEnd - this.localStart === local.length && this.xml.startsWith(local, this.localStart);
  }

  get name(): string {
    return this.xml.slice(this.nameStart, this.nameEnd);
  }

  get local(): string {
    return this.xml.slice(this.localStart, this.nameEnd);
  }

  get attrText(): string {
    return this.xml.slice(this.nameEnd, this.attrEnd);
  }

  /** One attribute of the tag by its local name (any prefix), unescaped, or undefined. */
  attr(local: string): string | undefined {
    return attributeIn(this.xml, this.nameEnd, this.attrEnd, local);
  }
}

/** [A-Za-z_] */
function isNameStart(c: number): boolean {
  return (c >= 97 && c <= 122) || (c >= 65 && c <= 90) || c === 95;
}

/** [\w.:-] */
function isNameChar(c: number): boolean {
  return (c >= 97 && c <= 122) || (c >= 65 && c <= 90) || (c >= 48 && c <= 58) || c === 95 || c === 46 || c === 45;
}

/** 9, 10, 13, 32: the white space of XML. */
function isSpace(c: number): boolean {
  return c === 32 || c === 10 || c === 9 || c === 13;
}

/**
 * One attribute by its local name (any prefix) from the attribute text xml[from, to), unescaped, or
 * undefined: `attribute` without the slices (names are read one after the other, so text inside
 * another attribute's value is never taken for an attribute).
 */
export function attributeIn(xml: string, from: number, to: number, local: string): string | undefined {
  let i = from;
  while (i < to) {
    const c = xml.charCodeAt(i);
    if (isSpace(c) || c === 47 /* / */) { i++; continue; }
    const nameStart = i;
    while (i < to) {
      const d = xml.charCodeAt(i);
      if (d === 61 /* = */ || isSpace(d) || d === 47) break;
      i++;
    }
    const nameEnd = i;
    while (i < to && isSpace(xml.charCodeAt(i))) i++;
    if (xml.charCodeAt(i) !== 61) continue; // a name without a value: not well-formed, skipped
    i++;
    while (i < to && isSpace(xml.charCodeAt(i))) i++;
    const q = xml.charCodeAt(i);
    if (q !== 34 && q !== 39) continue;
    const valueEnd = xml.indexOf(q === 34 ? '"' : "'", i + 1);
    if (valueEnd < 0 || valueEnd >= to) return undefined;
    const n = nameEnd - nameStart;
    if (n >= local.length && xml.startsWith(local, nameEnd - local.length)
      && (n === local.length || xml.charCodeAt(nameEnd - local.length - 1) === 58 /* : */)) {
      return unescapeXml(xml.slice(i + 1, valueEnd));
    }
    i = valueEnd + 1;
  }
  return undefined;
}
