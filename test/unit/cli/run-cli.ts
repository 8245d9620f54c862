// Runs the command line in-process on a folder, with captured streams and a fixed clock.
import { main } from '../../../src/cli';

export interface Outcome {
  readonly code: number;
  readonly stdout: string;
  readonly stderr: string;
}

export async function runCli(cwd: string, args: readonly string[], stdin = ''): Promise<Outcome> {
  let stdout = '';
  let stderr = '';
  const code = await main(args, {
    stdout: (t) => (stdout += t),
    stderr: (t) => (stderr += t),
    readStdin: async () => stdin,
    cwd,
    now: () => new Date('2026-11-30T12:00:00Z'),
  });
  return { code, stdout, stderr };
}
