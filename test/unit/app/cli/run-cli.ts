/** Runs the CLI in-process and captures what it prints. */
import { main } from '../../../../app/cli/main';

export interface CliRun {
  code: number;
  stdout: string;
  stderr: string;
}

export async function runCli(...argv: string[]): Promise<CliRun> {
  let stdout = '';
  let stderr = '';
  const code = await main(argv, {
    out: (t) => (stdout += t.endsWith('\n') ? t : t + '\n'),
    err: (t) => (stderr += t.endsWith('\n') ? t : t + '\n'),
  });
  return { code, stdout, stderr };
}
