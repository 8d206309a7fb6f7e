// Draws the add-in icons (a miscibility-gap dome on a rounded square) into assets/icon-<size>.png.
// Run: node assets/make-icons.mjs   (pngjs is a devDependency; the PNGs are committed).
import { writeFileSync } from 'fs';
import { fileURLToPath } from 'url';
import path from 'path';
import { PNG } from 'pngjs';

const here = path.dirname(fileURLToPath(import.meta.url));
const background = [21, 94, 117]; // deep teal
const dome = [255, 255, 255];
const inside = [125, 211, 222]; // the two-phase region

// Coverage of one sample point in unit coordinates (0..1, y down): 0 outside the square,
// 1 on the background, 2 on the dome's outline, 3 inside the dome.
function classify(u, v) {
  const r = 0.18; // corner radius
  const cx = Math.min(Math.max(u, r), 1 - r);
  const cy = Math.min(Math.max(v, r), 1 - r);
  if ((u - cx) ** 2 + (v - cy) ** 2 > r * r) return 0;
  // Dome: a symmetric binodal-like curve T(x) = 4x(1-x) rising to its top at x = 1/2.
  const x = (u - 0.14) / 0.72;
  const base = 0.84;
  const top = 0.18;
  if (x < 0 || x > 1) return 1;
  const y = base - (base - top) * Math.sqrt(4 * x * (1 - x));
  const stroke = 0.075;
  if (v >= y - stroke / 2 && v <= y + stroke / 2) return 2;
  if (v > y && v <= base) return 3;
  return 1;
}

function draw(size) {
  const png = new PNG({ width: size, height: size });
  const n = 4; // supersampling per axis
  for (let py = 0; py < size; py++) {
    for (let px = 0; px < size; px++) {
      const acc = [0, 0, 0, 0];
      for (let sy = 0; sy < n; sy++) {
        for (let sx = 0; sx < n; sx++) {
          const k = classify((px + (sx + 0.5) / n) / size, (py + (sy + 0.5) / n) / size);
          if (k === 0) continue;
          const c = k === 1 ? background : k === 2 ? dome : inside;
          acc[0] += c[0]; acc[1] += c[1]; acc[2] += c[2]; acc[3] += 1;
        }
      }
      const i = (py * size + px) * 4;
      const covered = acc[3];
      png.data[i] = covered ? Math.round(acc[0] / covered) : 0;
      png.data[i + 1] = covered ? Math.round(acc[1] / covered) : 0;
      png.data[i + 2] = covered ? Math.round(acc[2] / covered) : 0;
      png.data[i + 3] = Math.round((255 * covered) / (n * n));
    }
  }
  return PNG.sync.write(png);
}

for (const size of [16, 32, 64, 80]) {
  writeFileSync(path.join(here, `icon-${size}.png`), draw(size));
}
