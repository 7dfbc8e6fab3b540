// Every secret-like value written anywhere in the repository, found by reading the files, so the
// list grows with the code: provider-style keys (whsec_…, sk_test_…) and string values given to
// names that hold secrets (…SECRET, …PASSWORD, …API_KEY), plus the demo password.
import { execFileSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import path from 'node:path';

const ROOT = path.resolve(import.meta.dirname, '..', '..');
const PROVIDER_STYLE = /\b(?:whsec|sk_test|rk_test|sk_live|rk_live|pk_test)_[A-Za-z0-9_]*/g;
const ASSIGNED = /(?:SECRET|PASSWORD|API_KEY|apiKey|webhookSecret|secret)[A-Za-z_]*['"]?\s*[:=?]{1,2}\s*['"`]([^'"`\s$]{6,})['"`]/g;
const TEXT = /\.(ts|tsx|mjs|js|json|md|html|txt|yml|yaml|sh)$/;

export function secretsInRepository(): string[] {
  const files = execFileSync('git', ['ls-files'], { cwd: ROOT, encoding: 'utf8' }).split('\n')
    .filter((f) => TEXT.test(f) && !f.endsWith('package-lock.json'));
  const found = new Set<string>();
  for (const file of files) {
    let text: string;
    try { text = readFileSync(path.join(ROOT, file), 'utf8'); } catch { continue; }
    for (const m of text.matchAll(PROVIDER_STYLE)) found.add(m[0]);
    for (const m of text.matchAll(ASSIGNED)) found.add(m[1]);
  }
  return [...found].sort();
}
