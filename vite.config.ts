import { readdirSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { brotliCompressSync, constants, gzipSync } from 'node:zlib';
import { defineConfig, type Plugin } from 'vite';
import react from '@vitejs/plugin-react';
import tailwindcss from '@tailwindcss/vite';

// precompress(): writes a .br and a .gz beside every compressible file of the client build, once,
// at maximum compression, so the server sends them as they are (server/http/static-files.ts)
// instead of compressing the same bytes on every request. Fonts, images and archives are already
// compressed and are left alone.
const PRECOMPRESSED_TYPES = /\.(js|mjs|css|html|svg|json|txt|map|webmanifest)$/;
// Below this a compressed copy saves less than its own headers cost.
const MIN_BYTES = 1024;

function* files(dir: string): Generator<string> {
  for (const entry of readdirSync(dir, { withFileTypes: true })) {
    const full = path.join(dir, entry.name);
    if (entry.isDirectory()) yield* files(full);
    else yield full;
  }
}

/** Writes FILE.br and FILE.gz for each compressible file under dir; returns how many files. */
function precompressDir(dir: string): number {
  let count = 0;
  for (const file of files(dir)) {
    if (!PRECOMPRESSED_TYPES.test(file) || statSync(file).size < MIN_BYTES) continue;
    const data = readFileSync(file);
    writeFileSync(`${file}.br`, brotliCompressSync(data, {
      params: { [constants.BROTLI_PARAM_QUALITY]: constants.BROTLI_MAX_QUALITY, [constants.BROTLI_PARAM_SIZE_HINT]: data.length },
    }));
    writeFileSync(`${file}.gz`, gzipSync(data, { level: constants.Z_BEST_COMPRESSION }));
    count++;
  }
  return count;
}

function precompress(): Plugin {
  let outDir = 'dist';
  return {
    name: 'kneepoint-precompress',
    apply: 'build',
    configResolved(config) {
      outDir = path.resolve(config.root, config.build.outDir);
    },
    closeBundle() {
      precompressDir(outDir);
    },
  };
}

// The dev server forwards API calls to the app on PORT (the same variable the app listens on).
const api = `http://127.0.0.1:${process.env.PORT ?? 3000}`;

export default defineConfig({
  plugins: [react(), tailwindcss(), precompress()],
  server: {
    host: '127.0.0.1',
    proxy: { '/api': api, '/verify': api },
  },
  build: { outDir: 'dist', emptyOutDir: true, chunkSizeWarningLimit: 900 },
});
