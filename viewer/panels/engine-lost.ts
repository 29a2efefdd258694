// The notice the page shows when its engine worker is gone (viewer/engine-client.ts finds out):
// what happened, what is safe, and a button that starts a new engine.

export interface EngineLostNotice {
  /** Model day the run on screen had reached, or null when no run was on screen. */
  day: number | null;
  /** Start a new engine and load the scenario again; rejects with a message to show. */
  restart(): Promise<void>;
}

export function engineLostText(day: number | null): string {
  const where =
    day === null
      ? 'No run was on screen.'
      : `The run on screen had reached day ${+day.toFixed(2)}; what it shows can still be saved in the library below.`;
  return `The model engine has stopped: the browser ended its worker (for lack of memory, a crash, or another reason it does not tell the page). ${where} Your saved runs are not affected. Restart the engine to load the scenario again from its start.`;
}

/** Show the notice in `host` (once: a second call replaces the first). */
export function showEngineLost(host: HTMLElement, notice: EngineLostNotice): HTMLElement {
  host.querySelector('#engine-lost')?.remove();
  const box = document.createElement('div');
  box.id = 'engine-lost';
  box.className = 'message';
  box.setAttribute('role', 'alert');
  const text = document.createElement('span');
  text.textContent = engineLostText(notice.day);
  const restart = document.createElement('button');
  restart.type = 'button';
  restart.id = 'btn-engine-restart';
  restart.textContent = 'Restart the engine';
  restart.addEventListener('click', async () => {
    restart.disabled = true;
    restart.textContent = 'restarting…';
    try {
      await notice.restart();
      box.remove();
    } catch (e) {
      text.textContent = `The engine could not be restarted: ${(e as Error).message ?? String(e)}. Reload the page; your saved runs are not affected.`;
      restart.textContent = 'Restart the engine';
      restart.disabled = false;
    }
  });
  box.append(text, restart);
  host.prepend(box);
  return box;
}
