// The NetCDF readers that our users take Pycno's files to, as Debian packages them: the netCDF4
// Python module (the reference netcdf-c library underneath), xarray with full CF decoding,
// ncdump and CDO, plus the UDUNITS-2 library for units strings. Each reader runs in a child
// process on a file and reports every problem it shows: a non-zero exit, any output on stderr,
// a Python warning (turned into an error), a CDO "Warning" line. A test passes a file only when
// the list of problems is empty.
//
// Debian's own programs only: /usr/bin/python3 (never another python on PATH) in isolated mode
// (-I: no user site-packages, no PYTHON* variables), /usr/bin/ncdump, /usr/bin/cdo. Where one is
// not installed, missing() says which Debian package to install, for ctx.skip.

import { spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';

export const PYTHON = '/usr/bin/python3';
export const NCDUMP = '/usr/bin/ncdump';
export const CDO = '/usr/bin/cdo';

export interface ReaderRun {
  /** The command as one would type it. */
  command: string;
  stdout: string;
  /** Every warning, error or stray stderr line; empty when the reader was content. */
  problems: string[];
}

export interface OutsideReader {
  name: string;
  /** The Debian package that brings it. */
  debianPackage: string;
  /** null when the reader can run here, else a message naming the missing package. */
  missing(): string | null;
  read(path: string): ReaderRun;
}

// Slow hosts (2 cores shared, xarray's imports): a generous limit that only stops a hung reader.
const LIMIT_MS = 180_000;

function runCommand(program: string, args: string[], shown: string): ReaderRun {
  const r = spawnSync(program, args, { encoding: 'utf8', timeout: LIMIT_MS, maxBuffer: 64 << 20 });
  const problems: string[] = [];
  if (r.error) problems.push(`${shown}: could not run: ${r.error.message}`);
  else if (r.status !== 0) problems.push(`${shown}: exit status ${r.status}${r.signal ? ` (signal ${r.signal})` : ''}`);
  for (const line of (r.stderr ?? '').split('\n')) if (line.trim() !== '') problems.push(`${shown}: stderr: ${line}`);
  return { command: shown, stdout: r.stdout ?? '', problems };
}

const missingProgram = (path: string, pkg: string) => () =>
  existsSync(path) ? null : `${path} is not installed (Debian package ${pkg}: apt-get install ${pkg})`;

const pythonCache = new Map<string, string | null>();
/** null when Debian's python3 can import the module. */
function missingPython(module: string, pkg: string): () => string | null {
  return () => {
    if (!existsSync(PYTHON))
      return `${PYTHON} is not installed (Debian packages python3 and ${pkg}: apt-get install ${pkg})`;
    if (!pythonCache.has(module)) {
      const r = spawnSync(PYTHON, ['-I', '-c', `import ${module}`], { encoding: 'utf8', timeout: LIMIT_MS });
      pythonCache.set(
        module,
        r.status === 0 ? null : `${PYTHON} cannot import ${module} (Debian package ${pkg}: apt-get install ${pkg})`,
      );
    }
    return pythonCache.get(module)!;
  };
}

// Both Python readers import everything first and only then turn warnings into errors: the
// imports themselves may warn about the installed packages (numpy ABI notes), which says nothing
// about our file. Everything after the filter that warns fails the run with a traceback.
const PY_PRELUDE = `
import json, sys, warnings
import numpy as np
`;

/** netCDF4: opens the file and reads every variable with the library's default decoding. */
const PY_NETCDF4 =
  PY_PRELUDE +
  `
import netCDF4
warnings.simplefilter('error')
def plain(x):
    if isinstance(x, (str, bytes)): return x if isinstance(x, str) else x.decode('utf-8')
    a = np.asarray(x)
    return [float(v) for v in a.reshape(-1).tolist()]
ds = netCDF4.Dataset(sys.argv[1], 'r')
out = {'data_model': ds.data_model, 'dimensions': {d.name: len(d) for d in ds.dimensions.values()},
       'attributes': {k: plain(ds.getncattr(k)) for k in ds.ncattrs()}, 'variables': {}}
for name, v in ds.variables.items():
    data = v[...]  # masked, scaled, char arrays with _Encoding turned into strings
    entry = {'dtype': str(v.dtype), 'dimensions': list(v.dimensions),
             'attributes': {k: plain(v.getncattr(k)) for k in v.ncattrs()}}
    if data.dtype.kind in 'OUS': entry['text'] = [str(s) for s in np.asarray(data).reshape(-1).tolist()]
    out['variables'][name] = entry
ds.close()
print(json.dumps(out))
`;

/** xarray: open_dataset with every CF decoding on (times, masks, coordinates, cell measures). */
const PY_XARRAY =
  PY_PRELUDE +
  `
import xarray as xr
import netCDF4  # the backend xarray picks; imported before the filter like the rest
warnings.simplefilter('error')
ds = xr.open_dataset(sys.argv[1], decode_cf=True, mask_and_scale=True, decode_times=True, decode_coords='all')
ds.load()
out = {'coords': sorted(str(k) for k in ds.coords), 'data_vars': sorted(str(k) for k in ds.data_vars)}
if 'time' in ds.variables and ds['time'].ndim == 1:
    t = ds['time']
    out['time_dtype'] = str(t.dtype)
    if np.issubdtype(t.dtype, np.datetime64):
        out['time_iso'] = [str(s) for s in np.datetime_as_string(t.values, unit='ms')]
if 'probe_name' in ds.variables:
    out['probe_name_dtype'] = str(ds['probe_name'].dtype)
    out['probe_name'] = [x if isinstance(x, str) else repr(x) for x in ds['probe_name'].values.tolist()]
out['cell_measures'] = {str(k): v.attrs.get('cell_measures', v.encoding.get('cell_measures')) for k, v in ds.variables.items()
                        if 'cell_measures' in v.attrs or 'cell_measures' in v.encoding}
ds.close()
print(json.dumps(out))
`;

function pythonReader(name: string, module: string, pkg: string, script: string): OutsideReader {
  return {
    name,
    debianPackage: pkg,
    missing: missingPython(module, pkg),
    read: (path) => runCommand(PYTHON, ['-I', '-c', script, path], `${PYTHON} (${name}) ${path}`),
  };
}

function cdoReader(operator: string): OutsideReader {
  return {
    name: `cdo ${operator}`,
    debianPackage: 'cdo',
    missing: missingProgram(CDO, 'cdo'),
    read: (path) => {
      const r = runCommand(CDO, ['-s', operator, path], `cdo -s ${operator} ${path}`);
      // CDO writes its warnings to stderr; a "Warning" on stdout would be a failure too.
      for (const line of r.stdout.split('\n')) if (/warning/i.test(line)) r.problems.push(`${r.command}: ${line}`);
      return r;
    },
  };
}

export const NETCDF4_READER = pythonReader('netCDF4', 'netCDF4', 'python3-netcdf4', PY_NETCDF4);
export const XARRAY_READER = pythonReader('xarray', 'xarray', 'python3-xarray', PY_XARRAY);
export const NCDUMP_HEADER: OutsideReader = {
  name: 'ncdump -h',
  debianPackage: 'netcdf-bin',
  missing: missingProgram(NCDUMP, 'netcdf-bin'),
  read: (path) => runCommand(NCDUMP, ['-h', path], `ncdump -h ${path}`),
};
export const NCDUMP_DATA: OutsideReader = {
  name: 'ncdump',
  debianPackage: 'netcdf-bin',
  missing: missingProgram(NCDUMP, 'netcdf-bin'),
  read: (path) => runCommand(NCDUMP, [path], `ncdump ${path}`),
};
/** sinfon: the variables and grids CDO finds; infon: statistics over every record of each. */
export const CDO_SINFON = cdoReader('sinfon');
export const CDO_INFON = cdoReader('infon');
export const CDO_SHOWTIMESTAMP = cdoReader('showtimestamp');

export const OUTSIDE_READERS: readonly OutsideReader[] = [
  NETCDF4_READER,
  XARRAY_READER,
  NCDUMP_HEADER,
  NCDUMP_DATA,
  CDO_SINFON,
  CDO_INFON,
  CDO_SHOWTIMESTAMP,
];

// --- UDUNITS-2: does a units string parse, and does it convert to another? ----------------------

const PY_UDUNITS =
  PY_PRELUDE +
  `
import ctypes
lib = ctypes.CDLL('libudunits2.so.0')
lib.ut_set_error_message_handler.restype = ctypes.c_void_p
lib.ut_set_error_message_handler.argtypes = [ctypes.c_void_p]
lib.ut_set_error_message_handler(ctypes.cast(lib.ut_ignore, ctypes.c_void_p))  # the XML database notes
lib.ut_read_xml.restype = ctypes.c_void_p
lib.ut_read_xml.argtypes = [ctypes.c_char_p]
lib.ut_parse.restype = ctypes.c_void_p
lib.ut_parse.argtypes = [ctypes.c_void_p, ctypes.c_char_p, ctypes.c_int]
lib.ut_are_convertible.restype = ctypes.c_int
lib.ut_are_convertible.argtypes = [ctypes.c_void_p, ctypes.c_void_p]
system = lib.ut_read_xml(None)
if not system: sys.exit('UDUNITS-2: cannot read the units database')
def parse(s): return lib.ut_parse(system, s.encode('utf-8'), 0)  # 0 = UT_ASCII
req = json.loads(sys.argv[1])
out = {'parses': {u: bool(parse(u)) for u in req['units']}, 'convertible': []}
for a, b in req['pairs']:
    pa, pb = parse(a), parse(b)
    out['convertible'].append(bool(pa and pb and lib.ut_are_convertible(pa, pb)))
print(json.dumps(out))
`;

export const UDUNITS_PACKAGE = 'libudunits2-0';

let udunitsMissing: string | null | undefined;
export function missingUdunits(): string | null {
  if (udunitsMissing === undefined) {
    if (!existsSync(PYTHON)) udunitsMissing = `${PYTHON} is not installed (Debian package python3)`;
    else {
      const r = spawnSync(PYTHON, ['-I', '-c', "import ctypes; ctypes.CDLL('libudunits2.so.0')"], {
        encoding: 'utf8',
        timeout: LIMIT_MS,
      });
      udunitsMissing =
        r.status === 0
          ? null
          : `the UDUNITS-2 library libudunits2.so.0 is not installed (Debian package ${UDUNITS_PACKAGE}, which cdo brings)`;
    }
  }
  return udunitsMissing;
}

/** Which units strings UDUNITS-2 parses, and whether each pair [a, b] converts. */
export function udunits(
  units: readonly string[],
  pairs: ReadonlyArray<readonly [string, string]> = [],
): { parses: Record<string, boolean>; convertible: boolean[]; problems: string[] } {
  const r = runCommand(PYTHON, ['-I', '-c', PY_UDUNITS, JSON.stringify({ units, pairs })], `${PYTHON} (UDUNITS-2)`);
  if (r.problems.length > 0) return { parses: {}, convertible: [], problems: r.problems };
  return { ...JSON.parse(r.stdout), problems: [] };
}
