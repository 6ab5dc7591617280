/**
 * Bad input at a boundary. The message names the value, what was expected, and the fix.
 * cli/main maps it to exit code 2; every other failure is exit code 1.
 */
export class InputError extends Error {
  override readonly name = 'InputError';
  readonly exitCode = 2;
  constructor(message: string) {
    super(message);
  }
}

export function isInputError(e: unknown): e is InputError {
  return e instanceof InputError;
}
