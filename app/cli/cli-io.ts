/** Where a command writes: injected so tests can run commands in-process. */
export interface CliIo {
  out(text: string): void;
  err(text: string): void;
}

export const processIo: CliIo = {
  out: (text) => process.stdout.write(text.endsWith('\n') ? text : text + '\n'),
  err: (text) => process.stderr.write(text.endsWith('\n') ? text : text + '\n'),
};

/** Prints a machine-readable result: two-space JSON, one document per run. */
export function printJson(io: CliIo, value: unknown): void {
  io.out(JSON.stringify(value, null, 2));
}
