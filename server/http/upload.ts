import multer from 'multer';
import type { RequestHandler } from 'express';
import { invalid, tooLarge } from '../errors';

// The one way a route takes a file: a single optional file in a named multipart field, kept in
// memory (every cap is small and the bytes go to PostgreSQL), with multer's failures answered in
// words: 413 over the cap, 400 for a second file, a wrong field, too many parts or a broken body.

const FIELD = Symbol('upload field');
type UploadHandler = RequestHandler & { [FIELD]?: string };

/** The multipart field an upload middleware reads (the fuzz test finds upload routes by it). */
export function uploadFieldOf(handler: RequestHandler): string | undefined {
  return (handler as UploadHandler)[FIELD];
}

const megabytes = (bytes: number) => (bytes >= 1048576 ? `${+(bytes / 1048576).toFixed(1)} MB` : `${Math.round(bytes / 1024)} KB`);

/** `what` names the file in messages ("photo", "BOM CSV", "WAV capture"). */
export function singleUpload(field: string, maxBytes: number, what: string): RequestHandler {
  const upload = multer({ storage: multer.memoryStorage(), limits: { fileSize: maxBytes, files: 1, fields: 20, parts: 24, fieldSize: 64 * 1024 } }).single(field);
  const handler: UploadHandler = (req, res, next) => upload(req, res, (error: unknown) => {
    if (!error) return next();
    const code = (error as { code?: string }).code;
    switch (code) {
      case 'LIMIT_FILE_SIZE':
        return next(tooLarge(`The ${what} is larger than ${megabytes(maxBytes)}`));
      case 'LIMIT_FILE_COUNT':
        return next(invalid(`Send one ${what} at a time`, { [field]: 'Only one file' }));
      case 'LIMIT_UNEXPECTED_FILE':
        return next(invalid(`Send the ${what} in the “${field}” field`, { [field]: 'Unexpected file field' }));
      case 'LIMIT_PART_COUNT':
      case 'LIMIT_FIELD_COUNT':
        return next(invalid(`The ${what} upload has too many parts`, { _: 'Too many form fields' }));
      case 'LIMIT_FIELD_KEY':
      case 'LIMIT_FIELD_VALUE':
        return next(invalid(`A form field of the ${what} upload is too long`, { _: 'Form field too long' }));
      default:
        return next(invalid(`The ${what} upload could not be read`, { [field]: 'The multipart body is incomplete or malformed' }));
    }
  });
  handler[FIELD] = field;
  return handler;
}
