// One error type for everything that is wrong with a wind design, so callers can tell a user's
// mistake (show the message) from a bug (report it).

export class ForcingError extends Error {
  override name = 'ForcingError';
}
