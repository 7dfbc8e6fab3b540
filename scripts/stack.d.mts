// Types for stack.mjs (plain JavaScript so bootstrap.mjs can use it before npm packages exist).
import type { StdioOptions } from 'node:child_process';

export interface Supervised {
  readonly name: string;
  /** The running process id, or undefined while waiting to restart. */
  readonly pid: number | undefined;
  /** How many times the program was started (1 + restarts). */
  readonly starts: number;
  stop(graceMs?: number): Promise<void>;
}

export interface StackPorts { app: number; payments: number; smtp: number; mailHttp: number; vite: number }

export function stackPorts(env: NodeJS.ProcessEnv): StackPorts;
export function fakesWanted(env: NodeJS.ProcessEnv): boolean;
export function startStack(options: {
  root: string; env: NodeJS.ProcessEnv; fakes: boolean; dev?: boolean; workers?: number; mailFile?: string;
  log?: (line: string) => void; stdio?: StdioOptions;
}): { ports: StackPorts; programs: Record<string, Supervised>; stop(graceMs?: number): Promise<void> };
