/** Where a command writes: the process's streams in the shell, buffers in the tests. */
export interface Output {
  write(text: string): void;
  readonly isTTY?: boolean;
}

export interface CommandIo {
  readonly stdout: Output;
  readonly stderr: Output;
}
