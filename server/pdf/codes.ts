// Machine-readable codes on Kneepoint's PDFs, from well-known packages only: QR codes are encoded by
// `qrcode` (its module matrix, drawn as vector squares), linear barcodes by `bwip-js` (rendered by
// the package to a PNG). Nothing here encodes a symbol itself.
import bwipjs from 'bwip-js/node';
import QRCode from 'qrcode';

/** Draws the QR code of `text` as a `size` × `size` pt square at (x, y), in `colour`. */
export function drawQr(doc: PDFKit.PDFDocument, text: string, x: number, y: number, size: number, colour = '#000') {
  const code = QRCode.create(text, { errorCorrectionLevel: 'M' });
  const n = code.modules.size;
  const cell = size / n;
  for (let r = 0; r < n; r++) {
    for (let c = 0; c < n; c++) if (code.modules.get(r, c)) doc.rect(x + c * cell, y + r * cell, cell, cell);
  }
  doc.fill(colour);
}

/**
 * A Code 128 barcode of `text` as a PNG from bwip-js, without its human-readable line (the label
 * prints the text itself, larger). `moduleWidthPx` pixels per narrow bar, `heightMm` bar height.
 */
export function code128Png(text: string, heightMm = 15, moduleWidthPx = 3): Promise<Buffer> {
  // bwip-js's `scale` is pixels per module at 72 dpi's "points"; height is in millimetres.
  return bwipjs.toBuffer({ bcid: 'code128', text, scale: moduleWidthPx, height: heightMm, includetext: false, paddingwidth: 10, paddingheight: 0, backgroundcolor: 'FFFFFF' });
}
