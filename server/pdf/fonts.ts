import path from 'node:path';
import { fileURLToPath } from 'node:url';
import PDFDocument from 'pdfkit';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..');

// The same families the pages use, from npm packages: nothing is fetched at run time.
export const FONT_FILES = {
  body: path.join(root, 'node_modules/source-sans/TTF/SourceSans3-Regular.ttf'),
  semibold: path.join(root, 'node_modules/source-sans/TTF/SourceSans3-Semibold.ttf'),
  bold: path.join(root, 'node_modules/source-sans/TTF/SourceSans3-Bold.ttf'),
  mono: path.join(root, 'node_modules/dejavu-fonts-ttf/ttf/DejaVuSansMono.ttf'),
} as const;

export type FontName = keyof typeof FONT_FILES;

// pdfkit parses a font file's tables again for every new document, which is most of the cost of
// a one-page sheet. We parse each font once and give every document its own embedding wrapper
// (its own glyph subset and id) around the shared parsed font, pre-seeding pdfkit's per-document
// font cache. This reaches into pdfkit internals of the pinned version (0.17): the embedding
// class is taken from a probe document, and `_fontFamilies` / `_fontCount` are pdfkit's own.
interface PdfkitInternals {
  _font: { constructor: new (doc: unknown, font: unknown, id: string) => { layoutCache?: object }; font: unknown };
  _fontFamilies: Record<string, unknown>;
  _fontCount: number;
}

interface Shared {
  Embedded: PdfkitInternals['_font']['constructor'];
  fonts: Map<FontName, unknown>;
  layouts: Map<FontName, Record<string, unknown>>;
}
let shared: Shared | null = null;
const LAYOUT_CACHE_LIMIT = 20_000;

function parseOnce(): Shared {
  if (shared) return shared;
  const probe = new PDFDocument();
  const fonts = new Map<FontName, unknown>();
  let Embedded: Shared['Embedded'] | null = null;
  for (const [name, file] of Object.entries(FONT_FILES) as [FontName, string][]) {
    probe.registerFont(name, file);
    probe.font(name);
    const internals = probe as unknown as PdfkitInternals;
    Embedded = internals._font.constructor;
    fonts.set(name, internals._font.font);
  }
  probe.end();
  shared = { Embedded: Embedded!, fonts, layouts: new Map() };
  return shared;
}

/** Registers Kneepoint's fonts on a document under the names body, semibold, bold and mono. */
export function registerFonts(doc: PDFKit.PDFDocument) {
  const { Embedded, fonts, layouts } = parseOnce();
  const internals = doc as unknown as PdfkitInternals;
  for (const [name, file] of Object.entries(FONT_FILES) as [FontName, string][]) {
    doc.registerFont(name, file);
    const embedded = new Embedded(doc, fonts.get(name), `F${++internals._fontCount}`);
    // Laid-out runs depend only on the font and the text, so documents can share them too.
    let layout = layouts.get(name);
    if (!layout || Object.keys(layout).length > LAYOUT_CACHE_LIMIT) layouts.set(name, (layout = Object.create(null) as Record<string, unknown>));
    embedded.layoutCache = layout;
    internals._fontFamilies[name] = embedded;
  }
}
