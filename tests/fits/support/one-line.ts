import { KilnInputError } from '../../../generators/errors.ts';

/** The CLI's one-line message of the input error thrown by fn ('no error' when none). */
export function oneLineOf(fn: () => unknown): string {
  try {
    fn();
  } catch (e) {
    if (e instanceof KilnInputError) return e.oneLine();
    throw e;
  }
  return 'no error';
}
