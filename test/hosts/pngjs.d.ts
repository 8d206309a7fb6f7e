// The part of pngjs the host tests use (the package ships no types).
declare module 'pngjs' {
  export const PNG: {
    sync: { read(data: Buffer): { width: number; height: number; data: Buffer } };
  };
}
