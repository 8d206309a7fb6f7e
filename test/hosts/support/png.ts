import { PNG } from 'pngjs';

/** Pixels darker than mid-grey in a PNG. */
export function darkPixels(png: Buffer): number {
  const img = PNG.sync.read(png);
  let n = 0;
  for (let i = 0; i < img.data.length; i += 4) {
    if (img.data[i + 3] > 0 && (img.data[i] + img.data[i + 1] + img.data[i + 2]) / 3 < 128) n++;
  }
  return n;
}
