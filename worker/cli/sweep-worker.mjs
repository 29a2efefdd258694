// One sweep worker thread: runs `pycno run` argument lists one at a time with the command
// line's own main(), its output captured and posted back.
import { register } from 'tsx/esm/api';
import { parentPort, workerData } from 'node:worker_threads';

register();
const { main } = await import('./main.ts');
parentPort.on('message', async ({ argv }) => {
  let stdout = '';
  let stderr = '';
  const io = {
    stdout: { write: (s) => (stdout += s) },
    stderr: { write: (s) => (stderr += s), isTTY: false },
    cwd: workerData.cwd,
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
