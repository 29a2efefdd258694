// One sweep worker thread: runs `pycno run` argument lists one at a time with the command
// line's own main(), its output captured and posted back.
import { register } from 'tsx/esm/api';
import { parentPort, workerData } from 'node:worker_threads';

register();
const { main } = await import('./main.ts');
// Ctrl-C reaches the sweep's main thread, which posts { interrupt: true } here; the member
// running now stops as pycno run stops on Ctrl-C (exit 130, its records kept).
let interrupted = false;
let onInterrupt = null;
parentPort.on('message', async ({ argv, interrupt }) => {
  if (interrupt) {
    interrupted = true;
    onInterrupt?.();
    return;
  }
  let stdout = '';
  let stderr = '';
  const io = {
    stdout: { write: (s) => (stdout += s) },
    stderr: { write: (s) => (stderr += s), isTTY: false },
    cwd: workerData.cwd,
    onInterrupt(handler) {
      onInterrupt = handler;
      if (interrupted) handler();
      return () => {
        if (onInterrupt === handler) onInterrupt = null;
      };
    },
  };
  let code;
  try {
    code = await main(argv, io);
  } catch (e) {
    stderr += String(e?.stack ? e.stack : e);
    code = 1;
  }
  parentPort.postMessage({ code, stdout, stderr });
});
