/**
 * Prefix of every Mixgap function name in a formula, as in Excel (`=MIXGAP.GAPLOW(...)`). The
 * manifest's `Functions.Namespace` string must be the same (test/hosts/manifest.test.ts); the
 * engine, the command and the help pages read it from here.
 */
export const NAMESPACE = 'MIXGAP';
