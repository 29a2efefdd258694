// What a command of the command line writes to and reads from: the process in bin/pycno.js, a
// recorder in the tests.

import type { ProgressStream } from './progress.ts';

export interface CliIO {
  stdout: { write(s: string): unknown };
  stderr: ProgressStream;
  cwd: string;
  /** Registers a Ctrl-C handler; returns its removal. */
  onInterrupt?: (handler: () => void) => () => void;
}
