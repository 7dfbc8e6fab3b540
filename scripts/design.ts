// CLI of the option designer's checking contract:
//   npm run --silent design -- FILE.json   → {"searched", "total", "failed", "cancelled", "candidates": [...]} on stdout, exit 0;
//   errors as in json-cli.ts
import { runDesign } from '../shared/design/search';
import { runJsonCli } from './json-cli';

runJsonCli('design', runDesign);
