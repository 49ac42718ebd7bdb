// Draws Ebbcast's app icons (the wave mark of the header, components/shell/app-shell.tsx Brand) on
// the accent colour and writes them as PNG files, with nothing but node:zlib:
//   node scripts/make-icons.mjs        → public/icons/icon-192.png, icon-512.png, icon-maskable-512.png
// The mark is the header's path "M2 24 C 8 24, 10 6, 16 6 S 24 22, 30 22" on a 32-unit grid,
// rasterised by distance to the curve (anti-aliased edges, round caps).
import { deflateSync } from 'node:zlib';
import { mkdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const ACCENT = [0x1f, 0x6f, 0x78];
const PAPER = [0xf7, 0xf4, 0xec];
const out = path.join(path.dirname(fileURLToPath(import.meta.url)), '..', 'public', 'icons');

/** The two cubic pieces of the mark (the S command's first control point is the reflection). */
const CUBICS = [
  [[2, 24], [8, 24], [10, 6], [16, 6]],
  [[16, 6], [22, 6], [24, 22], [30, 22]],
];

function polyline(steps = 160) {
  const pts = [];
  for (const [a, b, c, d] of CUBICS) {
    for (let i = 0; i <= steps; i++) {
      const t = i / steps, u = 1 - t;
      pts.push([
        u * u * u * a[0] + 3 * u * u * t * b[0] + 3 * u * t * t * c[0] + t * t * t * d[0],
        u * u * u * a[1] + 3 * u * u * t * b[1] + 3 * u * t * t * c[1] + t * t * t * d[1],
      ]);
    }
  }
  return pts;
}

function distToSegment(px, py, [ax, ay], [bx, by]) {
  const dx = bx - ax, dy = by - ay;
  const len2 = dx * dx + dy * dy;
  const t = len2 ? Math.max(0, Math.min(1, ((px - ax) * dx + (py - ay) * dy) / len2)) : 0;
  const x = ax + t * dx - px, y = ay + t * dy - py;
  return Math.hypot(x, y);
}

/** Coverage 0..1 of a rounded square of side `size` with corner radius `r` at pixel centre (x, y). */
function roundedSquare(x, y, size, r) {
  const cx = Math.min(Math.max(x, r), size - r), cy = Math.min(Math.max(y, r), size - r);
  const d = Math.hypot(x - cx, y - cy) - r;
  return Math.max(0, Math.min(1, 0.5 - d));
}

function draw(size, { maskable }) {
  const rgba = new Uint8Array(size * size * 4);
  // Maskable icons are cropped to any shape inside the central 80 %: full-bleed background, smaller mark.
  const markScale = maskable ? 0.62 : 0.8;
  const unit = (size * markScale) / 28; // the mark spans x 2..30 = 28 units
  const ox = (size - 28 * unit) / 2 - 2 * unit;
  const oy = (size - 18 * unit) / 2 - 6 * unit; // y spans 6..24 = 18 units
  const pts = polyline().map(([x, y]) => [ox + x * unit, oy + y * unit]);
  const half = (3.2 * unit) / 2;
  const radius = maskable ? 0 : size * 0.22;
  for (let j = 0; j < size; j++) {
    for (let i = 0; i < size; i++) {
      const x = i + 0.5, y = j + 0.5;
      const bg = maskable ? 1 : roundedSquare(x, y, size, radius);
      let d = Infinity;
      if (bg > 0) for (let k = 1; k < pts.length; k++) d = Math.min(d, distToSegment(x, y, pts[k - 1], pts[k]));
      const ink = Math.max(0, Math.min(1, half + 0.5 - d));
      const o = (j * size + i) * 4;
      for (let c = 0; c < 3; c++) rgba[o + c] = Math.round(ACCENT[c] * (1 - ink) + PAPER[c] * ink);
      rgba[o + 3] = Math.round(255 * bg);
    }
  }
  return rgba;
}

const CRC = new Uint32Array(256).map((_, n) => {
  let c = n;
  for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
  return c >>> 0;
});
function crc32(buf) {
  let c = 0xffffffff;
  for (const b of buf) c = CRC[(c ^ b) & 0xff] ^ (c >>> 8);
  return (c ^ 0xffffffff) >>> 0;
}
function chunk(type, data) {
  const len = Buffer.alloc(4);
  len.writeUInt32BE(data.length);
  const td = Buffer.concat([Buffer.from(type, 'ascii'), data]);
  const crc = Buffer.alloc(4);
  crc.writeUInt32BE(crc32(td));
  return Buffer.concat([len, td, crc]);
}
function png(size, rgba) {
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(size, 0);
  ihdr.writeUInt32BE(size, 4);
  ihdr[8] = 8; // bit depth
  ihdr[9] = 6; // RGBA
  const raw = Buffer.alloc(size * (size * 4 + 1));
  for (let y = 0; y < size; y++) {
    raw[y * (size * 4 + 1)] = 0; // filter: none
    Buffer.from(rgba.buffer, y * size * 4, size * 4).copy(raw, y * (size * 4 + 1) + 1);
  }
  return Buffer.concat([
    Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]),
    chunk('IHDR', ihdr),
    chunk('IDAT', deflateSync(raw, { level: 9 })),
    chunk('IEND', Buffer.alloc(0)),
  ]);
}

mkdirSync(out, { recursive: true });
for (const [name, size, maskable] of [['icon-192.png', 192, false], ['icon-512.png', 512, false], ['icon-maskable-512.png', 512, true]]) {
  const file = path.join(out, name);
  writeFileSync(file, png(size, draw(size, { maskable })));
  console.log(`wrote ${path.relative(process.cwd(), file)}`);
}
