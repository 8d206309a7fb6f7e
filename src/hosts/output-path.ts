/**
 * The rule of `-o` for the command's outputs (`mixgap calc`, `mixgap diagram`): which paths mean a
 * folder to write the default file name into, rather than the file itself.
 */
import { existsSync, statSync } from 'fs';

/** Whether `output` names a folder: it ends in a path separator, or it is an existing folder. */
export function isFolderPath(output: string): boolean {
  return /[\\/]$/.test(output) || (existsSync(output) && statSync(output).isDirectory());
}
