// The one shape of Kneepoint's checking CLIs: read FILE.json, answer one JSON object on stdout.
// Invalid input (unreadable file, bad JSON, out-of-range field) → {"error": {message, path}}, exit 2;
// anything else that fails (a solver that gave up) is ours → exit 1.
import { readFileSync } from 'node:fs';
import { EngineInputError, errorBody } from '../shared/engine/index';

function fail(message: string, path: string, code: number): never {
  process.stdout.write(`${JSON.stringify({ error: { message, path } })}\n`);
  process.exit(code);
}

/** Runs `compute` on the JSON file named by the first argument; `name` is the npm script's name. */
export function runJsonCli(name: string, compute: (input: unknown) => unknown): void {
  const file = process.argv[2];
  if (!file) fail(`usage: npm run --silent ${name} -- FILE.json`, '', 2);
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
    process.stdout.write(`${JSON.stringify(compute(json))}\n`);
  } catch (e) {
    const body = errorBody(e);
    fail(body.message, body.path, e instanceof EngineInputError ? 2 : 1);
  }
}
