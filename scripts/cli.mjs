// Runs a TypeScript CLI from a bundle built once with esbuild, so a run costs a bare `node` start
// instead of transpiling every file again (≈ 600 ms with tsx). Node built-ins only, except esbuild,
// which is loaded only to (re)build.
//   node scripts/cli.mjs NAME [args…]   run the CLI NAME (e.g. profile) with its arguments
//   node scripts/cli.mjs --build        build every bundle now (npm run build does this)
// The bundle is rebuilt on the first run after a fresh clone and whenever a file it was built from is
// newer than it, so it never runs stale code. Adding a CLI is one line in CLIS.
import { mkdirSync, readFileSync, renameSync, statSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
/** CLI name → its TypeScript entry point. */
const CLIS = {
  profile: 'scripts/profile.ts',
  design: 'scripts/design.ts',
  match: 'scripts/match.ts',
};
const OUT = path.join(ROOT, 'node_modules', '.cache', 'kneepoint-cli');

const bundlePath = (name) => path.join(OUT, `${name}.mjs`);
const inputsPath = (name) => path.join(OUT, `${name}.inputs.json`);

/** True when the bundle exists and no file it was built from (listed at build time) is newer. */
function fresh(name) {
  let built;
  try {
    built = statSync(bundlePath(name)).mtimeMs;
    const inputs = JSON.parse(readFileSync(inputsPath(name), 'utf8'));
    return inputs.every((file) => statSync(path.join(ROOT, file)).mtimeMs <= built);
  } catch {
    return false;
  }
}

async function build(name) {
  const { build: esbuild } = await import('esbuild');
  mkdirSync(OUT, { recursive: true });
  // Write to a private name, then rename: two runs building at once never see half a file.
  const tmp = `${bundlePath(name)}.${process.pid}.tmp`;
  const result = await esbuild({
    absWorkingDir: ROOT,
    entryPoints: [CLIS[name]],
    outfile: tmp,
    bundle: true,
    platform: 'node',
    format: 'esm',
    target: 'node20',
    minify: true,
    metafile: true,
    logLevel: 'error',
    // A CommonJS dependency inside an ES module bundle may call require for Node built-ins.
    banner: { js: "import { createRequire as __kpRequire } from 'node:module'; const require = __kpRequire(import.meta.url);" },
  });
  // Our own sources, plus the lockfile standing for every dependency bundled in.
  const inputs = [...Object.keys(result.metafile.inputs).filter((f) => !f.includes('node_modules/')), 'package-lock.json'];
  writeFileSync(`${inputsPath(name)}.${process.pid}.tmp`, JSON.stringify(inputs));
  renameSync(`${inputsPath(name)}.${process.pid}.tmp`, inputsPath(name));
  renameSync(tmp, bundlePath(name));
}

const [name, ...args] = process.argv.slice(2);
if (name === '--build') {
  for (const cli of Object.keys(CLIS)) await build(cli);
} else if (name && Object.hasOwn(CLIS, name)) {
  if (!fresh(name)) await build(name);
  // The CLI reads its own arguments from process.argv[2…], as when run directly.
  process.argv = [process.argv[0], bundlePath(name), ...args];
  await import(pathToFileURL(bundlePath(name)).href);
} else {
  process.stderr.write(`usage: node scripts/cli.mjs NAME [args…] | --build; NAME one of: ${Object.keys(CLIS).join(', ')}\n`);
  process.exit(2);
}
