#!/usr/bin/env node
// Launcher for the command line: registers tsx so Node runs the TypeScript sources as they are.
import { register } from 'tsx/esm/api';

register();
const { main } = await import('../worker/cli/main.ts');
const code = await main(process.argv.slice(2), {
  stdout: process.stdout,
  stderr: process.stderr,
  cwd: process.cwd(),
  onInterrupt(handler) {
    process.once('SIGINT', handler);
    return () => process.off('SIGINT', handler);
  },
});
process.exitCode = code;
