import { fileTypeFromBuffer } from 'file-type';
import { PHOTO_TYPES } from '../../shared/schemas/catalog';

// The one image-type check: the file's own bytes, read by the file-type package, decide what an
// upload is (the browser's declared type is only a guess). Model photos and build photos use it.
export type ImageType = (typeof PHOTO_TYPES)[number];

/** The image type from the file's own bytes, or null when it is not PNG, JPEG or WebP. */
export async function imageTypeOf(buffer: Buffer): Promise<ImageType | null> {
  const found = await fileTypeFromBuffer(buffer);
  return found && (PHOTO_TYPES as readonly string[]).includes(found.mime) ? (found.mime as ImageType) : null;
}
