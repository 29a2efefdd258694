// One error type for everything that is wrong with a wind design. It is a user's mistake, so it
// is an InputError: every host shows its message and the command line exits with 2.

import { InputError } from '../errors.ts';

export class ForcingError extends InputError {
  override name = 'ForcingError';
}
