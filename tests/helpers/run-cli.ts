import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';

export const CLI = fileURLToPath(new URL('../../dist/cli/main.js', import.meta.url));

export interface CliRun {
  code: number;
  stdout: string;
  stderr: string;
}

/** Run the built CLI as a user would, with no terminal. */
export function runCli(args: string[], opts: { cwd?: string; timeoutMs?: number } = {}): CliRun {
  const r = spawnSync(process.execPath, [CLI, ...args], { encoding: 'utf8', cwd: opts.cwd, timeout: opts.timeoutMs ?? 60_000 });
  return { code: r.status ?? -1, stdout: r.stdout, stderr: r.stderr };
}
