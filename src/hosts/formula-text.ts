/**
 * Reading formula texts as people type them, before the engine sees them: `;` between arguments
 * (as in Excel set to many European languages, where `,` is the decimal comma), and the function
 * names a formula calls (to say "add MIXGAP." when one of ours is called without it).
 */

/** Text of a formula outside "strings" and 'quoted sheet names', with each such part blanked. */
function outsideQuotes(formula: string): string {
  return formula.replace(/"(?:[^"]|"")*"?|'(?:[^']|'')*'?/g, (quoted) => ' '.repeat(quoted.length));
}

/** Why `;` between arguments was not read, and what to write instead. */
export const SEMICOLON_HINT = 'this formula separates arguments with ";" (as Excel does in some languages); ' +
  'write "," between arguments and "." as the decimal point, e.g. =SUM(1.5, 2)';

/** A formula after reading `;` separators: the text to evaluate, or the hint when it could not be read. */
export type SemicolonReading = { formula: string; hint?: undefined } | { formula: string; hint: string };

/**
 * `=SUM(1; 2)` -> `=SUM(1, 2)`. A `;` directly inside parentheses is never valid in the engine's
 * syntax (there `;` only separates the rows of an inline array `{1,2;3,4}`), so reading it as
 * the argument separator cannot change the meaning of a valid formula. It is done only when the
 * formula has no `,` and no inline array outside its strings: in the languages that write `;`
 * between arguments, `,` is the decimal comma and inline arrays have separators of their own, so
 * such a formula (`=GAPLOW(800; 21000,5)`) is left as it is, with `hint` to say what to write.
 * Text inside "strings" and 'quoted sheet names' is never changed.
 */
export function readSemicolons(formula: string): SemicolonReading {
  const plain = outsideQuotes(formula);
  const stack: string[] = [];
  const separators: number[] = [];
  for (let i = 0; i < plain.length; i++) {
    const c = plain[i];
    if (c === '(' || c === '{') stack.push(c);
    else if (c === ')' || c === '}') stack.pop();
    else if (c === ';' && stack[stack.length - 1] === '(') separators.push(i);
  }
  if (separators.length === 0) return { formula };
  if (/[,{]/.test(plain)) return { formula, hint: SEMICOLON_HINT };
  // outsideQuotes keeps every index (string indices are UTF-16 units in both texts).
  let out = '';
  let k = 0;
  for (const i of separators) {
    out += formula.slice(k, i) + ',';
    k = i + 1;
  }
  return { formula: out + formula.slice(k) };
}

/** Names of the functions a formula calls (upper case, in order, once each): `NAME(` outside quotes. */
export function calledNames(formula: string): string[] {
  const names = outsideQuotes(formula).toUpperCase().match(/(?<![\w.$])[A-Z_][\w.]*(?=\s*\()/g) ?? [];
  return [...new Set(names)];
}
