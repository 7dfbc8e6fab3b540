import path from 'node:path';
import { fileURLToPath } from 'node:url';
import type PDFDocument from 'pdfkit';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..');

// The same families the pages use, from npm packages: nothing is fetched at run time.
export const FONT_FILES = {
  body: path.join(root, 'node_modules/source-sans/TTF/SourceSans3-Regular.ttf'),
  semibold: path.join(root, 'node_modules/source-sans/TTF/SourceSans3-Semibold.ttf'),
  bold: path.join(root, 'node_modules/source-sans/TTF/SourceSans3-Bold.ttf'),
  mono: path.join(root, 'node_modules/dejavu-fonts-ttf/ttf/DejaVuSansMono.ttf'),
} as const;

export type FontName = keyof typeof FONT_FILES;

export function registerFonts(doc: PDFKit.PDFDocument | InstanceType<typeof PDFDocument>) {
  for (const [name, file] of Object.entries(FONT_FILES)) doc.registerFont(name, file);
}
