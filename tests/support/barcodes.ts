// Reads codes back from a PDF the way a scanner would see the printed page: poppler's pdftoppm
// renders the page to a PNG, pngjs reads its pixels, and ZXing's JavaScript port (@zxing/library)
// decodes them. Nothing here knows how the code was drawn.
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { BarcodeFormat, BinaryBitmap, DecodeHintType, GlobalHistogramBinarizer, HybridBinarizer, MultiFormatReader, RGBLuminanceSource } from '@zxing/library';
import { PNG } from 'pngjs';

export interface Raster { width: number; height: number; dpi: number; rgba: Buffer }

/** Renders one page of a PDF (1-based) at `dpi`, and keeps a copy of the PNG at `keepAs` if given. */
export function renderPage(pdf: Buffer, page = 1, dpi = 300, keepAs?: string): Raster {
  const dir = mkdtempSync(path.join(tmpdir(), 'kp-codes-'));
  try {
    writeFileSync(path.join(dir, 'in.pdf'), pdf);
    execFileSync('pdftoppm', ['-r', String(dpi), '-png', '-singlefile', '-f', String(page), '-l', String(page), path.join(dir, 'in.pdf'), path.join(dir, 'page')]);
    const bytes = readFileSync(path.join(dir, 'page.png'));
    if (keepAs) writeFileSync(keepAs, bytes);
    const png = PNG.sync.read(bytes);
    return { width: png.width, height: png.height, dpi, rgba: png.data };
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

/** The page's size in points as poppler's pdfinfo reports it. */
export function pageSizePoints(pdf: Buffer): { width: number; height: number; pages: number } {
  const dir = mkdtempSync(path.join(tmpdir(), 'kp-info-'));
  try {
    writeFileSync(path.join(dir, 'in.pdf'), pdf);
    const info = execFileSync('pdfinfo', [path.join(dir, 'in.pdf')], { encoding: 'utf8' });
    const [, w, h] = info.match(/Page size:\s+([\d.]+) x ([\d.]+) pts/)!;
    return { width: Number(w), height: Number(h), pages: Number(info.match(/Pages:\s+(\d+)/)![1]) };
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

/** The PDF's text as poppler's pdftotext extracts it. */
export function pdfText(pdf: Buffer): string {
  return execFileSync('pdftotext', ['-layout', '-', '-'], { input: pdf, encoding: 'utf8' });
}

/** Decodes one code of the given format in the raster, or in the part of it given in millimetres. */
export function decode(raster: Raster, format: 'CODE_128' | 'QR_CODE', areaMm?: { x: number; y: number; width: number; height: number }): string {
  const px = (mm: number) => Math.round((mm / 25.4) * raster.dpi);
  const x0 = areaMm ? Math.max(0, px(areaMm.x)) : 0;
  const y0 = areaMm ? Math.max(0, px(areaMm.y)) : 0;
  const w = areaMm ? Math.min(raster.width - x0, px(areaMm.width)) : raster.width;
  const h = areaMm ? Math.min(raster.height - y0, px(areaMm.height)) : raster.height;
  const luminance = new Uint8ClampedArray(w * h);
  for (let y = 0; y < h; y++) {
    for (let x = 0; x < w; x++) {
      const i = ((y0 + y) * raster.width + (x0 + x)) * 4;
      luminance[y * w + x] = (raster.rgba[i] * 299 + raster.rgba[i + 1] * 587 + raster.rgba[i + 2] * 114) / 1000;
    }
  }
  try {
    return decodeLuminance(luminance, w, h, format);
  } catch (error) {
    // ZXing's port misses some QR codes whose modules span many pixels (a few contents in ten, at
    // 300 dpi) and reads the same print at a coarser sampling, as a phone camera would see it:
    // try once more at half the resolution, averaging each 2 × 2 block.
    if (format !== 'QR_CODE' || w < 4 || h < 4) throw error;
    const hw = Math.floor(w / 2);
    const hh = Math.floor(h / 2);
    const half = new Uint8ClampedArray(hw * hh);
    for (let y = 0; y < hh; y++) {
      for (let x = 0; x < hw; x++) {
        const i = 2 * y * w + 2 * x;
        half[y * hw + x] = (luminance[i] + luminance[i + 1] + luminance[i + w] + luminance[i + w + 1]) / 4;
      }
    }
    return decodeLuminance(half, hw, hh, format);
  }
}

function decodeLuminance(luminance: Uint8ClampedArray, w: number, h: number, format: 'CODE_128' | 'QR_CODE'): string {
  const hints = new Map<DecodeHintType, unknown>([
    [DecodeHintType.POSSIBLE_FORMATS, [BarcodeFormat[format]]],
    [DecodeHintType.TRY_HARDER, true],
  ]);
  const reader = new MultiFormatReader();
  reader.setHints(hints);
  const source = new RGBLuminanceSource(luminance, w, h);
  // The two binarizers zxing offers: the local one first, then the global one, which some crops of
  // a clean print need (the local one occasionally misses a code there, depending on its content).
  try {
    return reader.decode(new BinaryBitmap(new HybridBinarizer(source))).getText();
  } catch {
    return reader.decode(new BinaryBitmap(new GlobalHistogramBinarizer(source))).getText();
  }
}
