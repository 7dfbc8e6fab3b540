// Responses compressed on the fly (gzip, or brotli at compression's default quality 4, as the client accepts): API JSON and CSV lists
// shrink 10× or more. compression's own filter already skips types that are compressed by nature
// (PDF, zip, images) and bodies under 1 KiB; files the build precompressed carry their
// Content-Encoding already and pass untouched. Event streams would be held back by the
// compressor's buffering, so they are never compressed.
import compression from 'compression';
import type { Request, Response } from 'express';

export function compressResponses() {
  return compression({
    filter: (req: Request, res: Response) => {
      if (String(res.getHeader('Content-Type') ?? '').startsWith('text/event-stream')) return false;
      return compression.filter(req, res);
    },
  });
}
