// CLI of the harmonic engine's outside contract:
//   npm run --silent profile -- FILE.json   → one JSON object on stdout, exit 0; errors as in json-cli.ts
import { runContract } from '../shared/engine/index';
import { runJsonCli } from './json-cli';

runJsonCli('profile', runContract);
