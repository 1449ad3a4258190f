/** Where a command writes: the process's streams in the shell, buffers in the tests. */
export interface Output {
  write(text: string): void;
  readonly isTTY?: boolean;
}

export interface CommandIo {
  readonly stdout: Output;
  readonly stderr: Output;
}

/**
 * How a command that runs until it is stopped (`play`, `demo`, `synth-check`, `ports --watch`)
 * ended: 0, or 130, 143, 129 or 70 after a signal or an internal error (`EXIT_CODES` in
 * src/live/run.ts). `main` (src/cli/main.ts) returns it, so every way of starting the command
 * (`diesis`, `npm start`, the tests) exits with the same code.
 */
export interface CommandEnd {
  code: number;
}
