/**
 * A1-style cell addresses and ranges, and the one formula rewrite a file needs: a shared formula,
 * stored once in a file for a whole block of cells, moved to another cell of the block.
 */

/** Column letters of a 0-based column index (0 -> A, 26 -> AA). */
export function columnName(col: number): string {
  let s = '';
  for (let n = col + 1; n > 0; n = Math.floor((n - 1) / 26)) s = String.fromCharCode(65 + ((n - 1) % 26)) + s;
  return s;
}

/** 0-based column index of column letters (A -> 0, AA -> 26). */
export function columnIndex(letters: string): number {
  let col = 0;
  for (const ch of letters.toUpperCase()) col = col * 26 + (ch.charCodeAt(0) - 64);
  return col - 1;
}

/** A1-style address of 0-based row and column. */
export function a1(row: number, col: number): string {
  return `${columnName(col)}${row + 1}`;
}

/** A1-style range of two corners, or a single address when they are the same cell. */
export function a1Range(top: number, left: number, bottom: number, right: number): string {
  return top === bottom && left === right ? a1(top, left) : `${a1(top, left)}:${a1(bottom, right)}`;
}

/** 0-based row and column of an A1-style address ($ allowed). */
export function parseA1(address: string): { row: number; col: number } {
  const m = /^\$?([A-Za-z]{1,3})\$?(\d+)$/.exec(address.trim());
  if (!m) throw new Error(`"${address}" is not a cell address such as B12`);
  return { row: Number(m[2]) - 1, col: columnIndex(m[1]) };
}

/** Rows and columns of an A1-style range such as A1:B6 (a single cell is a 1x1 range). */
export function parseRange(range: string): { top: number; left: number; bottom: number; right: number } {
  const [from, to = from] = range.split(':');
  const a = parseA1(from), b = parseA1(to);
  return { top: Math.min(a.row, b.row), left: Math.min(a.col, b.col), bottom: Math.max(a.row, b.row), right: Math.max(a.col, b.col) };
}

/** A sheet name as a formula writes it: quoted unless it is a plain identifier. */
export function quoteSheet(name: string): string {
  return /^[A-Za-z_][A-Za-z0-9_.]*$/.test(name) ? name : `'${name.replace(/'/g, "''")}'`;
}

const MAX_ROW = 1048576;
const MAX_COL = 16384;

/**
 * A formula written for one cell, as it reads in a cell `rows` below and `cols` right of it:
 * relative references move, `$`-fixed parts stay, text in "quotes" and 'quoted sheet names' are
 * left alone, and names or functions that look like addresses (LOG10(...), a name such as RATE2024
 * with more than three letters) are not touched. A reference moved off the sheet becomes #REF!.
 */
export function slideFormula(formula: string, rows: number, cols: number): string {
  return rows === 0 && cols === 0 ? formula : slider(formula)(rows, cols);
}

type Part = string | ((rows: number, cols: number) => string);

/**
 * `slideFormula` for one formula and many offsets: the formula is read once, and each call only
 * moves the references (a shared formula of a whole filled column is moved to every cell of it).
 */
export function slider(formula: string): (rows: number, cols: number) => string {
  const token = /("(?:[^"]|"")*"|'(?:[^']|'')*')|(\[[^\]]*\])|(\$?)([A-Za-z]{1,3})(\$?)(\d{1,7})(?![\w.(!])|(\$?)([A-Za-z]{1,3}):(\$?)([A-Za-z]{1,3})(?![\w.(!])|(\$?)(\d{1,7}):(\$?)(\d{1,7})(?![\w.(!])/g;
  const parts: Part[] = [];
  let last = 0;
  for (let m = token.exec(formula); m; m = token.exec(formula)) {
    const [match, quoted, bracket, cDollar, colText, rDollar, rowText, c1D, c1, c2D, c2, r1D, r1, r2D, r2] = m;
    if (quoted !== undefined || bracket !== undefined) continue;
    const before = m.index > 0 ? formula[m.index - 1] : '';
    if (/[\w.$]/.test(before)) continue; // inside a longer name or number
    if (colText !== undefined && columnIndex(colText) >= MAX_COL) continue; // a name such as ZZZ1, not a column
    parts.push(formula.slice(last, m.index));
    last = m.index + match.length;
    const col = (letters: string, fixed: string) => {
      const c0 = columnIndex(letters);
      return (cols: number) => {
        const c = fixed ? c0 : c0 + cols;
        return c < 0 || c >= MAX_COL ? undefined : `${fixed}${columnName(c)}`;
      };
    };
    const row = (digits: string, fixed: string) => {
      const r0 = Number(digits);
      return (rows: number) => {
        const r = fixed ? r0 : r0 + rows;
        return r < 1 || r > MAX_ROW ? undefined : `${fixed}${r}`;
      };
    };
    if (colText !== undefined) {
      const c = col(colText, cDollar), r = row(rowText, rDollar);
      parts.push((rows, cols) => {
        const a = c(cols), b = r(rows);
        return a === undefined || b === undefined ? '#REF!' : `${a}${b}`;
      });
    } else if (c1 !== undefined) {
      const a = col(c1, c1D), b = col(c2, c2D);
      parts.push((_rows, cols) => {
        const x = a(cols), y = b(cols);
        return x === undefined || y === undefined ? '#REF!' : `${x}:${y}`;
      });
    } else {
      const a = row(r1, r1D), b = row(r2, r2D);
      parts.push((rows) => {
        const x = a(rows), y = b(rows);
        return x === undefined || y === undefined ? '#REF!' : `${x}:${y}`;
      });
    }
  }
  parts.push(formula.slice(last));
  return (rows, cols) => {
    let out = '';
    for (const p of parts) out += typeof p === 'string' ? p : p(rows, cols);
    return out;
  };
}
