// Two kinds of failure the hosts treat differently: bad input (the command line exits with 2)
// and a run that blew up (exit 1). Both carry a message fit to show a user as it is.

/** Something the user gave is wrong: a scenario value, a file, a formula, a parameter. */
export class InputError extends Error {
  override name = 'InputError';
  /** Where the problem is, e.g. a JSON path such as "physics.reducedGravity", when known. */
  readonly where: string | undefined;
  constructor(message: string, where?: string) {
    super(where ? `${where}: ${message}` : message);
    this.where = where;
  }
}

export type BlowUpCause = 'not-a-number' | 'layer-vanished' | 'runaway-speed';

/** The numerical solution became unphysical: the run stops with the day, the place and a hint. */
export class BlowUpError extends Error {
  override name = 'BlowUpError';
  constructor(
    readonly reason: BlowUpCause,
    readonly day: number,
    readonly lon: number,
    readonly lat: number,
    readonly detail: string,
    readonly hint: string,
  ) {
    super(`the run blew up on day ${day.toFixed(2)} at ${formatLon(lon)}, ${formatLat(lat)}: ${detail}. ${hint}`);
  }
}

export function formatLon(lon: number): string {
  const l = ((((lon + 180) % 360) + 360) % 360) - 180;
  return `${Math.abs(l).toFixed(2)}°${l < 0 ? 'W' : 'E'}`;
}

export function formatLat(lat: number): string {
  return `${Math.abs(lat).toFixed(2)}°${lat < 0 ? 'S' : 'N'}`;
}
