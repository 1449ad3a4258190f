/**
 * An error the user can act on: its message is one line that says what is wrong and where.
 * The CLI prints it as `diesis: <message>` and exits with `exitCode`.
 */
export class UserError extends Error {
  override readonly name = 'UserError';
  constructor(
    message: string,
    readonly exitCode: number = 1,
  ) {
    super(message);
  }
}

/** Integer modulo that is never negative (`mod(-1, 12) === 11`). */
export function mod(n: number, m: number): number {
  return ((n % m) + m) % m;
}
