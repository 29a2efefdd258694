import { describe, expect, test } from 'vitest';
import { validateScenario } from '../../model/scenario/index.ts';
import { example, issueAt, issuesOf } from '../support/scenario-example.ts';

describe('the example scenario', () => {
  test('validates, and defaults are filled in', () => {
    const r = validateScenario(example());
    if (!r.ok) throw new Error(JSON.stringify(r.errors));
    expect(r.scenario.time.dtSeconds).toBe('auto');
    expect(r.scenario.time.safety).toBe(0.8);
    expect(r.scenario.physics.dynamics).toBe('linear');
    expect(r.scenario.physics.coriolis).toEqual({ kind: 'beta-plane' });
    expect(r.scenario.initial).toEqual({ kind: 'rest' });
    expect(r.scenario.wind.bulk).toEqual({ airDensity: 1.2, drag: 'large-pond', dragCoefficient: 0.0012 });
    expect(r.scenario.wind.updateHours).toBe(3);
    expect(r.scenario.wind.parts[0].enabled).toBe(true);
    expect(r.scenario.output.fields).toHaveLength(10);
  });

  test('a basin off the equator gets a default Hovmoller latitude inside it; a latitude written outside is still refused', () => {
    const north = example();
    delete north.hovmoller;
    Object.assign(north.basin, { latSouth: 5, latNorth: 25, resolution: 0.5 });
    delete north.probes;
    delete north.wind;
    north.basin.land = [];
    const r = validateScenario(north);
    if (!r.ok) throw new Error(JSON.stringify(r.errors));
    expect(r.scenario.hovmoller.lat).toEqual([5.25]); // the cell centre nearest to the equator
    const south = structuredClone(north);
    Object.assign(south.basin, { latSouth: -20, latNorth: -4 });
    const s = validateScenario(south);
    if (!s.ok) throw new Error(JSON.stringify(s.errors));
    expect(s.scenario.hovmoller.lat).toEqual([-4.25]);
    const written = structuredClone(north);
    written.hovmoller = { lat: [0] };
    expect(issueAt(issuesOf(written), 'hovmoller.lat[0]').message).toMatch(/outside the basin/);
  });

  test('validation does not change its input', () => {
    const json = example();
    const before = JSON.stringify(json);
    validateScenario(json);
    expect(JSON.stringify(json)).toBe(before);
  });
});

// Each test makes one kind of mistake and checks the path and the words of the message.
describe('mistakes in scenario files', () => {
  test('unknown key at the top level, with a suggestion', () => {
    const j = example();
    j.physcs = {};
    const i = issueAt(issuesOf(j), 'physcs');
    expect(i.message).toMatch(/^unknown key 'physcs' at the top level; did you mean 'physics'\?/);
  });

  test('unknown nested key, with a suggestion and the allowed keys', () => {
    const j = example();
    j.physics.layerThicknes = 200;
    const i = issueAt(issuesOf(j), 'physics.layerThicknes');
    expect(i.message).toContain("unknown key 'layerThicknes' in physics; did you mean 'layerThickness'?");
    expect(i.message).toContain('allowed: reducedGravity, layerThickness');
  });

  test('unknown key inside a kind branch (no noise from the other branches)', () => {
    const j = example();
    j.wind.parts[0].envelope.rampDays = 1;
    const issues = issuesOf(j);
    expect(issues).toHaveLength(1);
    expect(issues[0].path).toBe('wind.parts[0].envelope.rampDays');
    expect(issues[0].message).toContain("did you mean 'ramp'?");
  });

  test('wrong type', () => {
    const j = example();
    j.time.days = '30';
    expect(issueAt(issuesOf(j), 'time.days').message).toBe(
      'must be a number (got string "30"); length of the run in days',
    );
  });

  test("negative reduced gravity names the range and the meaning of g'", () => {
    const j = example();
    j.physics.reducedGravity = -0.02;
    expect(issueAt(issuesOf(j), 'physics.reducedGravity').message).toBe(
      "must be > 0 (got -0.02); reduced gravity g' in m s-2, typical 0.02-0.06",
    );
  });

  test('zero layer thickness', () => {
    const j = example();
    j.physics.layerThickness = 0;
    expect(issueAt(issuesOf(j), 'physics.layerThickness').message).toMatch(
      /^must be > 0 \(got 0\); resting thickness H of the upper layer in m/,
    );
  });

  test('value above the physical maximum', () => {
    const j = example();
    j.physics.layerThickness = 6000;
    expect(issueAt(issuesOf(j), 'physics.layerThickness').message).toMatch(/^must be <= 5000 \(got 6000\)/);
  });

  test('missing required field', () => {
    const j = example();
    delete j.basin.latNorth;
    expect(issueAt(issuesOf(j), 'basin.latNorth').message).toBe(
      'is required but missing; northern edge of the basin, degrees north (greater than latSouth)',
    );
  });

  test('unknown format version names the supported one, and nothing else is reported', () => {
    const j = example();
    j.format = 'pycno-scenario/2';
    j.physics.reducedGravity = -1;
    const issues = issuesOf(j);
    expect(issues).toHaveLength(1);
    expect(issues[0].path).toBe('format');
    expect(issues[0].message).toBe(
      'unknown format "pycno-scenario/2" (written for another version of the program); this program reads "pycno-scenario/1"',
    );
  });

  test('missing format', () => {
    const j = example();
    delete j.format;
    expect(issueAt(issuesOf(j), 'format').message).toContain('"format": "pycno-scenario/1"');
  });

  test('a scenario that is not an object', () => {
    const issues = issuesOf([1, 2]);
    expect(issues).toEqual([{ path: '', message: expect.stringContaining('a scenario is a JSON object') }]);
  });

  test('bad enum value, with a suggestion', () => {
    const j = example();
    j.physics.dynamics = 'nonlin';
    expect(issueAt(issuesOf(j), 'physics.dynamics').message).toBe(
      'must be one of "linear", "nonlinear" (got "nonlin"); did you mean \'nonlinear\'?',
    );
  });

  test('unknown kind collapses the oneOf noise into one message naming the kinds', () => {
    const j = example();
    j.initial = { kind: 'bmp', lon: 180, lat: 0 };
    const issues = issuesOf(j);
    expect(issues).toHaveLength(1);
    expect(issues[0].path).toBe('initial.kind');
    expect(issues[0].message).toBe(
      "unknown kind \"bmp\"; allowed: 'rest', 'bump', 'kelvin', 'rossby', 'restart', 'spinup'; did you mean 'bump'?",
    );
  });

  test('missing kind', () => {
    const j = example();
    j.wind.parts[0].envelope = { start: 0, duration: 10, ramp: 2 };
    const i = issueAt(issuesOf(j), 'wind.parts[0].envelope.kind');
    expect(i.message).toBe(
      "is missing; say which kind: one of 'constant', 'ramp', 'pulse', 'harmonics', 'table', 'switch-off'",
    );
  });

  test('an error deep inside the chosen branch of nested kinds', () => {
    const j = example();
    j.wind.parts[0].envelope.duration = -3;
    const issues = issuesOf(j);
    expect(issues).toHaveLength(1);
    expect(issues[0].path).toBe('wind.parts[0].envelope.duration');
    expect(issues[0].message).toBe('must be > 0 (got -3); length of the pulse in days, ramps included');
  });

  test('a value that is neither of the allowed forms', () => {
    const j = example();
    j.basin.resolution = '1';
    expect(issueAt(issuesOf(j), 'basin.resolution').message).toMatch(
      /^must be a number, or an object \{lon, lat\} \(got string "1"\); cell size in degrees/,
    );
    const k = example();
    k.time.dtSeconds = 'fast';
    expect(issueAt(issuesOf(k), 'time.dtSeconds').message).toMatch(
      /^must be a number, or the string "auto" \(got string "fast"\)/,
    );
  });

  test('integer required', () => {
    const j = example();
    j.wind.parts[0].source = {
      kind: 'painted',
      grid: { lon0: 140, lat0: -20, dLon: 10, dLat: 10, nLon: 2.5, nLat: 1, x: [0, 0], y: [0, 0] },
    };
    expect(issueAt(issuesOf(j), 'wind.parts[0].source.grid.nLon').message).toMatch(
      /^must be a whole number \(got 2.5\)/,
    );
  });

  test('a range with the wrong number of entries', () => {
    const j = example();
    j.wind.parts.push(burst({ window: [0, 10, 20] }));
    expect(issueAt(issuesOf(j), 'wind.parts[1].window').message).toMatch(
      /^must be a list of exactly 2 numbers \(got 3\); first and last day a burst may start/,
    );
  });

  test('a polygon with too few corners', () => {
    const j = example();
    j.basin.land.push({
      kind: 'polygon',
      points: [
        [150, 0],
        [151, 1],
      ],
    });
    expect(issueAt(issuesOf(j), 'basin.land[1].points').message).toMatch(/^must have at least 3 entries \(got 2\)/);
  });

  test('repeated and unknown output fields', () => {
    const j = example();
    j.output = { fields: ['ssh', 'ssh', 'sst'] };
    const issues = issuesOf(j);
    expect(issueAt(issues, 'output.fields').message).toBe('lists "ssh" more than once');
    expect(issueAt(issues, 'output.fields[2]').message).toContain('(got "sst"); did you mean \'ssh\'?');
  });

  test('eastern edge west of the western edge', () => {
    const j = example();
    j.basin.lonEast = -80;
    expect(issueAt(issuesOf(j), 'basin.lonEast').message).toMatch(
      /^must be east of lonWest \(lonWest = 140, lonEast = -80\); longitudes increase eastward/,
    );
  });

  test('resolution that does not divide the basin', () => {
    const j = example();
    j.basin.resolution = 0.7;
    expect(issueAt(issuesOf(j), 'basin.resolution').message).toBe(
      'the basin is 120 degrees wide, not a whole number of 0.7-degree cells (171.43); 0.5 or 1 would fit',
    );
    const k = example();
    k.basin.resolution = { lon: 1, lat: 3 };
    expect(issueAt(issuesOf(k), 'basin.resolution.lat').message).toMatch(
      /^the basin is 40 degrees tall, not a whole number of 3-degree cells/,
    );
  });

  test('too many cells', () => {
    const k = example();
    k.basin.resolution = { lon: 0.02, lat: 0.02 };
    expect(issueAt(issuesOf(k), 'basin.resolution').message).toMatch(/^gives 12,000,000 cells; at most 4,000,000/);
  });

  test('sponge bands wider than the basin', () => {
    const j = example();
    j.basin.sponge.widthDeg = 25;
    expect(issueAt(issuesOf(j), 'basin.sponge.widthDeg').message).toBe(
      'two sponge bands of 25 degrees do not fit in a basin 40 degrees tall; use less than 20',
    );
  });

  test('sponge band narrower than one cell', () => {
    const j = example();
    j.basin.sponge.widthDeg = 0.5;
    expect(issueAt(issuesOf(j), 'basin.sponge.widthDeg').message).toContain('narrower than one cell (1 degrees)');
  });

  test('land outside the basin', () => {
    const j = example();
    j.basin.land[0].lonWest = 130;
    expect(issueAt(issuesOf(j), 'basin.land[0]').message).toBe(
      'the rectangle 130..145 E, 10..20 N reaches outside the basin (140..260 E, -20..20 N)',
    );
    const k = example();
    k.basin.land.push({
      kind: 'polygon',
      points: [
        [200, 0],
        [210, 0],
        [205, 25],
      ],
    });
    expect(issueAt(issuesOf(k), 'basin.land[1].points[2]').message).toBe(
      'the corner [205, 25] lies outside the basin (140..260 E, -20..20 N)',
    );
  });

  test('land that covers the whole basin', () => {
    const j = example();
    j.basin.land = [{ kind: 'rectangle', lonWest: 140, lonEast: 260, latSouth: -20, latNorth: 20 }];
    j.probes = [];
    expect(issueAt(issuesOf(j), 'basin.land').message).toBe('covers every cell of the basin: no ocean is left');
  });

  test('probe on land, probe outside the basin, repeated probe name', () => {
    const j = example();
    j.probes = [
      { name: 'coast', lon: 142.5, lat: 15 },
      { name: 'far', lon: 300, lat: 0 },
      { name: 'coast', lon: 200, lat: 0 },
    ];
    const issues = issuesOf(j);
    expect(issueAt(issues, 'probes[0]').message).toBe(
      '(142.5, 15) lies on land (basin.land[0]); move it into the ocean',
    );
    expect(issueAt(issues, 'probes[1]').message).toBe('(300, 0) lies outside the basin (140..260 E, -20..20 N)');
    expect(issueAt(issues, 'probes[2].name').message).toBe(
      '"coast" is already the name of probes[0]; names must be unique',
    );
  });

  test('burst ranges reversed', () => {
    const j = example();
    j.wind.parts.push(burst({ lon: [200, 160] }));
    expect(issueAt(issuesOf(j), 'wind.parts[1].lon').message).toBe(
      'the range [200, 160] is reversed; write [min, max] with min <= max',
    );
  });

  test('burst ramp longer than half the shortest burst, and a window after the run', () => {
    const j = example();
    j.wind.parts.push(burst({ ramp: 4, window: [80, 90] }));
    const issues = issuesOf(j);
    expect(issueAt(issues, 'wind.parts[1].ramp').message).toBe(
      'a ramp of 4 days is longer than half the shortest burst (5 days); use at most 2.5',
    );
    expect(issueAt(issues, 'wind.parts[1].window').message).toBe(
      'no burst can start: the window opens on day 80, the run ends on day 60',
    );
  });

  test('table days not increasing', () => {
    const j = example();
    j.wind.parts[0].envelope = {
      kind: 'table',
      points: [
        [0, 0],
        [20, 1],
        [10, 0.5],
      ],
    };
    expect(issueAt(issuesOf(j), 'wind.parts[0].envelope.points[2]').message).toBe(
      'day 10 does not come after day 20 of the point before; the days of a table must increase',
    );
  });

  test('pulse ramps longer than half the duration', () => {
    const j = example();
    j.wind.parts[0].envelope.ramp = 6;
    expect(issueAt(issuesOf(j), 'wind.parts[0].envelope.ramp').message).toBe(
      'a ramp of 6 days is longer than half the pulse duration (10 days); use at most 5',
    );
  });

  test('a stress that must have been meant as a wind speed', () => {
    const j = example();
    j.wind.parts[0].source.x = 8;
    expect(issueAt(issuesOf(j), 'wind.parts[0].source.x').message).toContain(
      'for a wind speed in m s-1 set quantity to "wind"',
    );
  });

  test('output interval longer than the run', () => {
    const j = example();
    j.time.outputEveryDays = 90;
    expect(issueAt(issuesOf(j), 'time.outputEveryDays').message).toBe(
      'must be at most the run length (60 days) (got 90); no frame would be saved',
    );
  });

  test('time step above the stability limit gives the limit', () => {
    const j = example();
    j.time.dtSeconds = 40000;
    const m = issueAt(issuesOf(j), 'time.dtSeconds').message;
    // 1 degree cells to 20 degrees: f_max = beta y = 2.289e-11 x 2.224e6 m, and 1.5 / f_max = 29464.9 s.
    expect(m).toMatch(/^40000 s is above the stability limit: dt <= 29464 s, set by Coriolis/);
    expect(m).toContain('use at most 29464 s or "auto"');
  });

  test('a time step that does not divide the output interval gives the nearest ones that do', () => {
    const j = example();
    j.time.outputEveryDays = 0.25; // 21600 s
    j.time.dtSeconds = 1000;
    const m = issueAt(issuesOf(j), 'time.dtSeconds').message;
    // 21600 / 1000 = 21.6 steps: 22 steps of 981.8181818181819 s or 21 of 1028.5714285714287 s;
    // 21600 = 2^5 3^3 5^2, so its whole-second divisors nearest 1000 are 900 (24 steps) and 1080 (20).
    expect(m).toBe(
      '1000 s does not divide the output interval of 0.25 days (21600 s) into whole steps, so records could not fall on whole intervals; ' +
        'the nearest steps that do are 981.8181818181819 s (22 steps per interval) and 1028.5714285714287 s (21 steps); ' +
        'in whole seconds 900 s (24 steps) and 1080 s (20 steps); or use "auto"',
    );
  });

  test('a decimal time step that divides the interval to its last digit is accepted', () => {
    const j = example();
    j.time.outputEveryDays = 0.25;
    j.time.dtSeconds = 3085.714285714286; // 21600 / 7 as JavaScript prints it
    expect(validateScenario(j).ok).toBe(true);
    j.time.dtSeconds = 3085.7142857; // 7 steps make 21599.9999999 s: not whole
    expect(issueAt(issuesOf(j), 'time.dtSeconds').message).toMatch(
      /^3085\.7142857 s does not divide the output interval of 0\.25 days/,
    );
  });

  test('zero time step', () => {
    const j = example();
    j.time.dtSeconds = 0;
    expect(issueAt(issuesOf(j), 'time.dtSeconds').message).toMatch(/^must be > 0 \(got 0\); time step in seconds/);
  });

  test('surface layer deeper than the active layer', () => {
    const j = example();
    j.physics.surfaceLayer = { depth: 150 };
    expect(issueAt(issuesOf(j), 'physics.surfaceLayer.depth').message).toBe(
      'must be less than the layer thickness (150 m) (got 150)',
    );
  });

  test('initial Kelvin wave without the equator, bump that empties the layer', () => {
    const j = example();
    j.basin.latSouth = 2;
    j.basin.land = [];
    j.probes = [];
    j.hovmoller = { lat: [5] };
    j.basin.sponge.widthDeg = 2;
    j.initial = { kind: 'kelvin', lon: 180, amplitude: 10, zonalWidthDeg: 5 };
    expect(issueAt(issuesOf(j), 'initial.kind').message).toBe(
      'an equatorial Kelvin wave needs the equator inside the basin (latitudes 2..20)',
    );
    const k = example();
    k.initial = { kind: 'bump', lon: 200, lat: 0, radiusDeg: 3, amplitude: -200 };
    expect(issueAt(issuesOf(k), 'initial.amplitude').message).toBe(
      'a thermocline rise of 200 m would empty the 150 m layer; use an amplitude above -150',
    );
  });

  test('Hovmoller latitude outside the basin', () => {
    const j = example();
    j.hovmoller.lat = [0, 30];
    expect(issueAt(issuesOf(j), 'hovmoller.lat[1]').message).toBe("30 lies outside the basin's latitudes -20..20");
  });

  test('painted grid with the wrong number of values', () => {
    const j = example();
    j.wind.parts[0].source = {
      kind: 'painted',
      grid: { lon0: 140, lat0: -20, dLon: 10, dLat: 10, nLon: 3, nLat: 2, x: [0, 0, 0, 0, 0, 0], y: [0, 0] },
    };
    expect(issueAt(issuesOf(j), 'wind.parts[0].source.grid.y').message).toBe(
      'must hold nLat x nLon = 2 x 3 = 6 values (got 2)',
    );
  });

  test('empty strings where a path or name is needed', () => {
    const j = example();
    j.initial = { kind: 'restart', path: '' };
    expect(issueAt(issuesOf(j), 'initial.path').message).toMatch(/^must not be empty; path of the NetCDF file/);
  });
});

describe('several mistakes at once', () => {
  test('are all reported, each once, and nothing else', () => {
    const j = example();
    j.physics.reducedGravity = -0.02; // range
    j.physics.slip = 'partial'; // enum
    j.time.days = 'sixty'; // type
    j.basin.sponge.widthDeg = 25; // semantic
    j.wind.parts[0].envelope.ramp = 6; // semantic inside a kind branch
    j.extra = true; // unknown key
    const issues = issuesOf(j);
    expect(issues.map((i) => i.path).sort()).toEqual(
      [
        'basin.sponge.widthDeg',
        'extra',
        'physics.reducedGravity',
        'physics.slip',
        'time.days',
        'wind.parts[0].envelope.ramp',
      ].sort(),
    );
  });

  test('a semantic check is not repeated where the schema already complained', () => {
    const j = example();
    j.basin.lonEast = 'far east';
    const issues = issuesOf(j);
    expect(issues.map((i) => i.path)).toEqual(['basin.lonEast']);
  });
});

function burst(over: Record<string, unknown>): Record<string, unknown> {
  return {
    kind: 'bursts',
    quantity: 'stress',
    ratePerYear: 4,
    window: [0, 50],
    amplitude: [0.05, 0.15],
    lon: [150, 180],
    lat: [-2, 2],
    lonWidth: [5, 15],
    latWidth: [3, 6],
    duration: [5, 20],
    ramp: 1,
    ...over,
  };
}
