// Draws the app icons (a filtered-rectifier ripple trace on a green tile) and writes them as PNG
// with node's zlib, so no image tool is needed. Run: npx tsx scripts/make-icons.ts
// The PNGs are committed; run again only when the design changes.
import { mkdirSync, writeFileSync } from 'node:fs';
import { deflateSync } from 'node:zlib';

type Rgba = [number, number, number, number];

const TILE: Rgba = [0x0b, 0x5d, 0x45, 255];
const TRACE: Rgba = [0xff, 0xc8, 0x45, 255];
const BASELINE: Rgba = [0xff, 0xff, 0xff, 150];

interface IconDesign {
  file: string;
  sizePx: number;
  /** Full-bleed square (maskable: the platform crops it) or a rounded tile on transparency. */
  fullBleed: boolean;
  /** Fraction of the side the drawing spans; maskable art stays inside the 80 % safe circle. */
  artScale: number;
}

const DESIGNS: IconDesign[] = [
  { file: 'icon-192.png', sizePx: 192, fullBleed: false, artScale: 1 },
  { file: 'icon-512.png', sizePx: 512, fullBleed: false, artScale: 1 },
  { file: 'icon-maskable-512.png', sizePx: 512, fullBleed: true, artScale: 0.72 },
];

/** Output of a full-wave rectifier into a capacitor, peak 1: follows |sin| while charging, then sags linearly. */
function rippleTrace(halfCycles: number, sagPerHalfCycle: number, points: number): Array<[number, number]> {
  const trace: Array<[number, number]> = [];
  for (let k = 0; k <= points; k += 1) {
    const t = (k / points) * halfCycles;
    const lastPeak = Math.floor(t - 0.5) + 0.5;
    const held = lastPeak >= 0.5 ? 1 - sagPerHalfCycle * (t - lastPeak) : 0;
    trace.push([t / halfCycles, Math.max(Math.abs(Math.sin(Math.PI * t)), held)]);
  }
  return trace;
}

function insideRoundedSquare(x: number, y: number, radius: number): boolean {
  const dx = Math.max(radius - x, 0, x - (1 - radius));
  const dy = Math.max(radius - y, 0, y - (1 - radius));
  return dx * dx + dy * dy <= radius * radius;
}

function distanceToSegment(px: number, py: number, a: [number, number], b: [number, number]): number {
  const [ax, ay] = a;
  const [bx, by] = b;
  const lengthSquared = (bx - ax) ** 2 + (by - ay) ** 2;
  const u = lengthSquared === 0 ? 0 : Math.min(1, Math.max(0, ((px - ax) * (bx - ax) + (py - ay) * (by - ay)) / lengthSquared));
  return Math.hypot(px - (ax + u * (bx - ax)), py - (ay + u * (by - ay)));
}

function over(under: Rgba, top: Rgba, coverage: number): Rgba {
  const alphaTop = (top[3] / 255) * coverage;
  const alphaUnder = under[3] / 255;
  const alpha = alphaTop + alphaUnder * (1 - alphaTop);
  if (alpha === 0) return [0, 0, 0, 0];
  const mix = (i: 0 | 1 | 2) => (top[i] * alphaTop + under[i] * alphaUnder * (1 - alphaTop)) / alpha;
  return [mix(0), mix(1), mix(2), alpha * 255];
}

function drawIcon(design: IconDesign): Buffer {
  const { sizePx, fullBleed, artScale } = design;
  const art = (u: number) => 0.5 + (u - 0.5) * artScale;
  const trace = rippleTrace(3.5, 0.22, 400).map(([u, v]): [number, number] => [art(0.16 + 0.68 * u), art(0.66 - 0.34 * v)]);
  const baselineY = art(0.74);
  const strokeHalf = 0.035 * artScale;
  const baseHalf = 0.012 * artScale;
  const samples = 3;
  const pixels = Buffer.alloc(sizePx * sizePx * 4);
  for (let row = 0; row < sizePx; row += 1) {
    for (let col = 0; col < sizePx; col += 1) {
      let tile = 0;
      let stroke = 0;
      let base = 0;
      for (let sy = 0; sy < samples; sy += 1) {
        for (let sx = 0; sx < samples; sx += 1) {
          const x = (col + (sx + 0.5) / samples) / sizePx;
          const y = (row + (sy + 0.5) / samples) / sizePx;
          if (!(fullBleed || insideRoundedSquare(x, y, 0.2))) continue;
          tile += 1;
          if (Math.abs(y - baselineY) <= baseHalf && x >= art(0.14) && x <= art(0.86)) base += 1;
          for (let k = 1; k < trace.length; k += 1) {
            const a = trace[k - 1] as [number, number];
            const b = trace[k] as [number, number];
            if (Math.min(a[0], b[0]) - strokeHalf > x || Math.max(a[0], b[0]) + strokeHalf < x) continue;
            if (distanceToSegment(x, y, a, b) <= strokeHalf) {
              stroke += 1;
              break;
            }
          }
        }
      }
      const total = samples * samples;
      let colour: Rgba = [TILE[0], TILE[1], TILE[2], (TILE[3] * tile) / total];
      if (tile > 0) {
        colour = over(colour, BASELINE, base / tile);
        colour = over(colour, TRACE, stroke / tile);
      }
      pixels.set(colour.map((channel) => Math.round(channel)), (row * sizePx + col) * 4);
    }
  }
  return encodePng(sizePx, sizePx, pixels);
}

// PNG (ISO/IEC 15948): signature, IHDR, IDAT, IEND; each chunk carries a CRC-32 of type + data.
const CRC_TABLE = Array.from({ length: 256 }, (_, n) => {
  let c = n;
  for (let k = 0; k < 8; k += 1) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
  return c >>> 0;
});

function crc32(bytes: Buffer): number {
  let crc = 0xffffffff;
  for (const byte of bytes) crc = (CRC_TABLE[(crc ^ byte) & 0xff] as number) ^ (crc >>> 8);
  return (crc ^ 0xffffffff) >>> 0;
}

function chunk(type: string, data: Buffer): Buffer {
  const length = Buffer.alloc(4);
  length.writeUInt32BE(data.length);
  const body = Buffer.concat([Buffer.from(type, 'ascii'), data]);
  const crc = Buffer.alloc(4);
  crc.writeUInt32BE(crc32(body));
  return Buffer.concat([length, body, crc]);
}

function encodePng(width: number, height: number, rgba: Buffer): Buffer {
  const header = Buffer.alloc(13);
  header.writeUInt32BE(width, 0);
  header.writeUInt32BE(height, 4);
  header.set([8, 6, 0, 0, 0], 8); // 8 bits per channel, RGBA, deflate, adaptive filtering, no interlace
  const rowBytes = width * 4;
  const raw = Buffer.alloc((rowBytes + 1) * height);
  for (let row = 0; row < height; row += 1) {
    raw[row * (rowBytes + 1)] = 0; // filter type None
    rgba.copy(raw, row * (rowBytes + 1) + 1, row * rowBytes, (row + 1) * rowBytes);
  }
  return Buffer.concat([
    Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]),
    chunk('IHDR', header),
    chunk('IDAT', deflateSync(raw, { level: 9 })),
    chunk('IEND', Buffer.alloc(0)),
  ]);
}

const outDir = new URL('../public/icons/', import.meta.url);
mkdirSync(outDir, { recursive: true });
for (const design of DESIGNS) {
  const png = drawIcon(design);
  writeFileSync(new URL(design.file, outDir), png);
  console.log(`public/icons/${design.file}: ${design.sizePx}×${design.sizePx}, ${png.length} bytes`);
}
