// Types for supervisor.mjs (plain JavaScript so bootstrap.mjs can use it before npm packages exist).
import type { StdioOptions } from 'node:child_process';
import type { Supervised } from './stack.mjs';

export function supervise(program: {
  name: string; command: string; args?: string[]; cwd?: string; env?: NodeJS.ProcessEnv; stdio?: StdioOptions;
  detached?: boolean; log?: (line: string) => void; minDelayMs?: number; maxDelayMs?: number; stableAfterMs?: number;
}): Supervised;
export function stopInOrder(programs: Supervised[], graceMs?: number): Promise<void>;
