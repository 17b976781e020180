/** What a CLI command may touch: injected so commands can be tested without a child process. */
export interface CliIo {
  readStdin(): Promise<string>;
  out(text: string): void;
  err(text: string): void;
}

export function processIo(): CliIo {
  return {
    readStdin: async () => {
      const chunks: Buffer[] = [];
      for await (const chunk of process.stdin) chunks.push(chunk as Buffer);
      return Buffer.concat(chunks).toString('utf8');
    },
    out: (text) => process.stdout.write(text.endsWith('\n') ? text : `${text}\n`),
    err: (text) => process.stderr.write(text.endsWith('\n') ? text : `${text}\n`),
  };
}

/** A CliIo over strings, for tests. */
export function memoryIo(stdin = ''): CliIo & { stdout: string[]; stderr: string[] } {
  const stdout: string[] = [];
  const stderr: string[] = [];
  return {
    stdout,
    stderr,
    readStdin: async () => stdin,
    out: (t) => stdout.push(t),
    err: (t) => stderr.push(t),
  };
}
