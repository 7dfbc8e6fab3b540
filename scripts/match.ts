// CLI of the device-matching checking contract (schema and rules in shared/matching/pairs.ts):
//   npm run --silent match -- FILE.json   → {"pairs", "totalDeltaMv", "worstDeltaMv", "unused"} on stdout, exit 0;
//   errors as in json-cli.ts
import { runMatch } from '../shared/matching/pairs';
import { runJsonCli } from './json-cli';

runJsonCli('match', runMatch);
