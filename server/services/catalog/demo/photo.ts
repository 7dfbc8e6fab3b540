// Demo product photos: a plain drawing of each pedal (enclosure, knobs, footswitch, status LED) as a PNG,
// made here so the demo ships no image files and no one's artwork.
import { deflateSync } from 'node:zlib';

const CRC_TABLE = Array.from({ length: 256 }, (_, n) => {
  let c = n;
  for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
  return c >>> 0;
});

function crc32(buf: Buffer): number {
  let c = 0xffffffff;
  for (const b of buf) c = CRC_TABLE[(c ^ b) & 0xff] ^ (c >>> 8);
  return (c ^ 0xffffffff) >>> 0;
}

function chunk(type: string, data: Buffer): Buffer {
  const len = Buffer.alloc(4);
  len.writeUInt32BE(data.length);
  const body = Buffer.concat([Buffer.from(type, 'latin1'), data]);
  const crc = Buffer.alloc(4);
  crc.writeUInt32BE(crc32(body));
  return Buffer.concat([len, body, crc]);
}

type Rgb = [number, number, number];
const hex = (h: string): Rgb => [parseInt(h.slice(1, 3), 16), parseInt(h.slice(3, 5), 16), parseInt(h.slice(5, 7), 16)];

/** A 360 × 360 PNG of a pedal in the given enclosure colour with `knobs` knobs. */
export function pedalPng(enclosure: string, knobs: number): Buffer {
  const size = 360;
  const paper = hex('#f7f4ee');
  const body = hex(enclosure);
  const shade: Rgb = [body[0] * 0.75, body[1] * 0.75, body[2] * 0.75].map(Math.round) as Rgb;
  const knob = hex('#efe6d2');
  const metal = hex('#b9bcbf');
  const led = hex('#d8322f');
  const raw = Buffer.alloc((size * 3 + 1) * size);
  const inRoundRect = (x: number, y: number, x0: number, y0: number, x1: number, y1: number, r: number) => {
    if (x < x0 || x > x1 || y < y0 || y > y1) return false;
    const cx = Math.min(Math.max(x, x0 + r), x1 - r);
    const cy = Math.min(Math.max(y, y0 + r), y1 - r);
    return (x - cx) ** 2 + (y - cy) ** 2 <= r * r;
  };
  const knobCentres = Array.from({ length: knobs }, (_, i) => [100 + (i * 160) / Math.max(1, knobs - 1), 115] as const);
  for (let y = 0; y < size; y++) {
    raw[y * (size * 3 + 1)] = 0; // filter: none
    for (let x = 0; x < size; x++) {
      let c: Rgb = paper;
      if (inRoundRect(x, y, 74, 24, 290, 340, 22)) c = shade;
      if (inRoundRect(x, y, 68, 18, 284, 334, 22)) c = body;
      for (const [kx, ky] of knobCentres) {
        const d = Math.hypot(x - kx, y - ky);
        if (d <= 26) c = knob;
        if (d <= 26 && Math.abs(x - kx) <= 2 && y < ky - 8) c = shade; // pointer
      }
      if (Math.hypot(x - 176, y - 190) <= 7) c = led;
      const fs = Math.hypot(x - 176, y - 270);
      if (fs <= 30) c = metal;
      if (fs <= 20) c = hex('#8e9296');
      const o = y * (size * 3 + 1) + 1 + x * 3;
      raw[o] = c[0]; raw[o + 1] = c[1]; raw[o + 2] = c[2];
    }
  }
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(size, 0);
  ihdr.writeUInt32BE(size, 4);
  ihdr[8] = 8; ihdr[9] = 2; ihdr[10] = 0; ihdr[11] = 0; ihdr[12] = 0; // 8-bit RGB
  return Buffer.concat([
    Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]),
    chunk('IHDR', ihdr), chunk('IDAT', deflateSync(raw)), chunk('IEND', Buffer.alloc(0)),
  ]);
}
