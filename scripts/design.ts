// CLI of the option designer's checking contract:
//   npm run --silent design -- FILE.json   → {"searched", "total", "failed", "cancelled", "candidates": [...]} on stdout, exit 0
//   invalid input (unreadable file, bad JSON, out-of-range field) → {"error": {message, path}}, exit 2
import { readFileSync } from 'node:fs';
import { runDesign } from '../shared/design/search';
import { EngineInputError, errorBody } from '../shared/engine/index';

function fail(message: string, path: string, code: number): never {
  process.stdout.write(`${JSON.stringify({ error: { message, path } })}\n`);
  process.exit(code);
}

const file = process.argv[2];
if (!file) fail('usage: npm run --silent design -- FILE.json', '', 2);
let text: string;
try {
  text = readFileSync(file, 'utf8');
} catch (e) {
  fail(`cannot read ${file}: ${(e as Error).message}`, '', 2);
}
let json: unknown;
try {
  json = JSON.parse(text);
} catch (e) {
  fail(`${file} is not valid JSON: ${(e as Error).message}`, '', 2);
}
try {
  process.stdout.write(`${JSON.stringify(runDesign(json))}\n`);
} catch (e) {
  const body = errorBody(e);
  // Input errors are the caller's (exit 2); anything else is ours (exit 1).
  fail(body.message, body.path, e instanceof EngineInputError ? 2 : 1);
}
