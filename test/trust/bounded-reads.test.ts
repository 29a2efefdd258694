// Every input bounded before it is read (issue 20): a path that names a device, a named pipe, a
// folder or nothing at all is refused with what it is; a file larger than its kind allows is
// refused by its size, before a byte of it is read; text is UTF-8 by one rule on the command line
// and in the page; a CSV wind file's messages name the file, line and column but never repeat
// its text. Command-line cases are real `pycno` invocations in a temporary folder; the page's
// side (viewer/picked-file.ts) runs here in Node on Blobs, as the page hands it picked files.

import { spawnSync } from 'node:child_process';
import { closeSync, existsSync, mkdirSync, openSync, readFileSync, truncateSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { READ_LIMITS } from '../../model/io/read-limits.ts';
import { decodeUtf8Text, TextEncodingError } from '../../model/io/text-decode.ts';
import { parseWindCsv } from '../../model/forcing/csv.ts';
import { pickedBytes, pickedScenarioText } from '../../viewer/picked-file.ts';
import { readBounded, ReadRefused } from '../../worker/files-node.ts';
import { BIN, folder, noInternals, pycno, refusedWith } from '../support/cli-kit.ts';

let dir: string;
let scenario: Record<string, any>;

beforeAll(() => {
  dir = folder('bounded');
  scenario = JSON.parse(readFileSync(join(dir, 'tiny.json'), 'utf8'));
  spawnSync('mkfifo', [join(dir, 'pipe')]);
  mkdirSync(join(dir, 'a-folder'));
});

/** An empty file of `bytes` bytes that takes no disk space (sparse). */
function sparse(name: string, bytes: number): string {
  const path = join(dir, name);
  closeSync(openSync(path, 'w'));
  truncateSync(path, bytes);
  return name;
}

/** A scenario like tiny.json with a change, written as `name`. */
function variant(name: string, change: (sc: Record<string, any>) => void): string {
  const sc = structuredClone(scenario);
  change(sc);
  writeFileSync(join(dir, name), JSON.stringify(sc, null, 2));
  return name;
}

const csvWind = (path: string) => (sc: Record<string, any>) => {
  sc.wind.parts[0].source = { kind: 'file', format: 'csv', path };
};

describe('the scenario path: only a regular file is read', () => {
  it("pycno run '' says the path is empty (it used to say 'it is a directory')", () => {
    refusedWith(pycno(dir, ['run', '']), /^pycno: '': cannot read the scenario file: the path is empty$/);
    refusedWith(pycno(dir, ['check', '']), /^pycno: '': cannot read the scenario file: the path is empty$/);
  });

  it('a folder, a named pipe with no writer (it used to block for ever), /dev/zero (read until memory ran out): each named for what it is', () => {
    for (const [path, what] of [
      ['a-folder', 'a folder'],
      ['pipe', 'a named pipe'],
      ['/dev/zero', 'a character device'],
    ] as const) {
      for (const command of ['run', 'check']) {
        const r = pycno(dir, [command, path], 20_000);
        expect(r.code, `${command} ${path}: killed by the timeout?`).not.toBeNull();
        refusedWith(
          r,
          new RegExp(
            `^pycno: ${path.replace(/\//g, '\\/')}: cannot read the scenario file: it is ${what}, not a regular file; only regular files are read$`,
          ),
        );
      }
    }
  });

  it('a 1.5 GiB file is refused by its size before it is read (it was read whole first: 3.1 GB resident)', () => {
    const big = sparse('huge.json', 1.5 * 1024 ** 3);
    const r = pycno(dir, ['check', big]);
    refusedWith(
      r,
      /^pycno: huge\.json: cannot read the scenario file: the file is 1\.50 GiB; a scenario file is read only up to 16\.0 MiB \(put large wind data in a CSV or NetCDF wind file\)$/,
    );
    // Resident memory of the whole command, by GNU time (a node process alone is about 100 MB).
    if (existsSync('/usr/bin/time')) {
      const t = spawnSync('/usr/bin/time', ['-f', '%M', process.execPath, BIN, 'check', big], {
        cwd: dir,
        encoding: 'utf8',
      });
      const kib = Number(t.stderr.trim().split('\n').pop());
      expect(kib).toBeGreaterThan(0);
      expect(kib).toBeLessThan(400 * 1024);
    }
  });
});

describe('the inputs a scenario names: wind files and restart files', () => {
  it('a CSV wind file that is /dev/zero, a named pipe or a folder: refused at once, naming the path and what it is', () => {
    for (const [path, what] of [
      ['/dev/zero', 'a character device'],
      ['pipe', 'a named pipe'],
      ['a-folder', 'a folder'],
    ] as const) {
      const f = variant(`wind-${what.replace(/\W+/g, '-')}.json`, csvWind(path));
      const r = pycno(dir, ['run', f, '--out', 'never.nc'], 20_000);
      refusedWith(
        r,
        new RegExp(
          `^pycno: ${f}: wind\\.parts\\[0\\]\\.source\\.path: cannot read the wind file ${path.startsWith('/') ? '' : '.*'}${path.replace(/\//g, '\\/')}: it is ${what}, not a regular file`,
        ),
      );
    }
    expect(existsSync(join(dir, 'never.nc'))).toBe(false);
  });

  it("a restart path that is /dev/zero or a named pipe, in the user's own scenario: refused at once", () => {
    for (const [path, what] of [
      ['/dev/zero', 'a character device'],
      ['pipe', 'a named pipe'],
    ] as const) {
      const f = variant(`restart-${what.replace(/\W+/g, '-')}.json`, (sc) => (sc.initial = { kind: 'restart', path }));
      refusedWith(
        pycno(dir, ['run', f, '--out', 'never.nc'], 20_000),
        new RegExp(
          `^pycno: ${f}: initial\\.path: cannot read the restart file .*${path.replace(/\//g, '\\/')}: it is ${what}, not a regular file`,
        ),
      );
    }
  });

  it('files over the limit of their kind are refused by size: CSV 64 MiB, NetCDF restart 1 GiB, spin-up scenario 16 MiB', () => {
    sparse('big.csv', 65 * 1024 ** 2);
    sparse('big-restart.nc', 1024 ** 3 + 1);
    sparse('big-spin.json', 17 * 1024 ** 2);
    const csv = variant('big-csv.json', csvWind('big.csv'));
    const restart = variant('big-restart.json', (sc) => (sc.initial = { kind: 'restart', path: 'big-restart.nc' }));
    const spin = variant('big-spin-user.json', (sc) => (sc.initial = { kind: 'spinup', scenario: 'big-spin.json' }));
    refusedWith(
      pycno(dir, ['run', csv, '--out', 'never.nc']),
      /wind\.parts\[0\]\.source\.path: cannot read the wind file big\.csv: the file is 65\.0 MiB; a CSV wind file is read only up to 64\.0 MiB/,
    );
    refusedWith(
      pycno(dir, ['run', restart, '--out', 'never.nc']),
      /initial\.path: cannot read the restart file big-restart\.nc: the file is 1\.00 GiB; a NetCDF input file is read only up to 1\.00 GiB/,
    );
    refusedWith(
      pycno(dir, ['run', spin, '--out', 'never.nc']),
      /initial\.scenario: cannot read the spin-up scenario big-spin\.json: the file is 17\.0 MiB; a scenario file is read only up to 16\.0 MiB/,
    );
  });

  it('run files over 2 GiB: compare, report and rerun refuse them by size', () => {
    const big = sparse('big-run.nc', 2 * 1024 ** 3 + 4096);
    const line =
      /^pycno: big-run\.nc: cannot read the run file: the file is 2\.00 GiB; a run file is read only up to 2\.00 GiB/;
    refusedWith(pycno(dir, ['report', big, '--out', 'never.html']), line);
    refusedWith(pycno(dir, ['rerun', big]), line);
    const good = pycno(dir, ['run', 'tiny.json', '--out', 'small.nc', '--quiet']);
    expect(good.code).toBe(0);
    refusedWith(pycno(dir, ['compare', 'small.nc', big]), line);
  });

  it('the reader never reads past the limit, also from a file with no size (the limit + 1 bytes at most)', () => {
    // /proc files report a size of 0 and are read to their end; one longer than the limit is refused.
    expect(() => readBounded('/proc/self/status', { maxBytes: 64, what: 'a test file', advice: 'none' })).toThrow(
      /the file grew while it was read, past a test file's limit of 64 bytes/,
    );
    expect(new TextDecoder().decode(readBounded('/proc/self/status', READ_LIMITS.scenario))).toMatch(/^Name:/);
    expect(() => readBounded(join(dir, 'no-such-file'), READ_LIMITS.scenario)).toThrow(ReadRefused);
  });
});

describe('CSV wind messages name the file, the line and the column, never the text', () => {
  const secret = "hunter2:x:0:0:the first line of somebody's private file";
  it('a readable file that is not a wind file: the message does not show its first line (rerun could be pointed at one)', () => {
    writeFileSync(join(dir, 'private.txt'), `${secret}\nsecond line\n`);
    const f = variant('wind-private.json', csvWind('private.txt'));
    const r = pycno(dir, ['check', f]);
    refusedWith(
      r,
      /^pycno: wind-private\.json: wind part 1 \('westerly patch'\): the wind file private\.txt: CSV line 1, column 1: the header names a column other than lon, lat, x, y and day/,
    );
    expect(r.stderr).not.toMatch(/hunter2|private file|second line/);
  });

  it('a value that is not a number: line, column and its column name; the text is not repeated', () => {
    const e = (() => {
      try {
        parseWindCsv('lon,lat,x,y\n150,0,0.1,0\n151,0,password123,0\n');
      } catch (err) {
        return err as Error;
      }
      throw new Error('accepted');
    })();
    expect(e.message).toBe("CSV line 3, column 3 ('x'): the value is not a number (a field of 11 characters)");
    expect(() => parseWindCsv('lon,lat,x,y\n150,0,,0\n')).toThrow(
      "CSV line 2, column 3 ('x'): the value is empty; every field must hold a number",
    );
  });
});

describe('text is UTF-8, by one rule for the command line and the page', () => {
  const good = () => new TextEncoder().encode(JSON.stringify(scenario));
  const withBadByte = () => {
    const b = new TextEncoder().encode(
      JSON.stringify(scenario, null, 2).replace('Tiny westerly patch', 'Tiny westerly p\u00e4tch'),
    );
    const at = b.indexOf(0xc3);
    b[at] = 0xff; // the first byte of "ä" made invalid
    return { bytes: b, at };
  };
  const utf16 = (bom: boolean) => {
    const text = JSON.stringify(scenario);
    const out = new Uint8Array((bom ? 2 : 0) + text.length * 2);
    if (bom) out.set([0xff, 0xfe]);
    for (let k = 0; k < text.length; k++) out[(bom ? 2 : 0) + 2 * k] = text.charCodeAt(k);
    return out;
  };

  it('invalid UTF-8 is refused with the place of the first bad byte (it silently became replacement characters)', async () => {
    const { bytes, at } = withBadByte();
    writeFileSync(join(dir, 'bad-utf8.json'), bytes);
    const line = new RegExp(
      `^pycno: bad-utf8\\.json: the file is not UTF-8 text: byte ${at} \\(line 3, column 27\\) is 0xFF, which does not begin a valid UTF-8 character; save it as UTF-8$`,
    );
    refusedWith(pycno(dir, ['check', 'bad-utf8.json']), line);
    // The page: the same words after the file name.
    const page = await pickedScenarioText(new Blob([bytes]));
    expect(page).toEqual({
      ok: false,
      message: `the file is not UTF-8 text: byte ${at} (line 3, column 27) is 0xFF, which does not begin a valid UTF-8 character; save it as UTF-8`,
    });
  });

  it('UTF-16, with or without its byte-order mark, is refused by both (the page used to accept it)', async () => {
    for (const [bom, how] of [
      [true, 'little-endian, by its byte-order mark'],
      [false, 'little-endian: a zero byte after every ASCII character'],
    ] as const) {
      const name = `utf16-${bom ? 'bom' : 'plain'}.json`;
      writeFileSync(join(dir, name), utf16(bom));
      refusedWith(
        pycno(dir, ['check', name]),
        new RegExp(`^pycno: ${name.replace('.', '\\.')}: the file is UTF-16 text \\(${how}\\); save it as UTF-8$`),
      );
      expect(await pickedScenarioText(new Blob([utf16(bom)]))).toEqual({
        ok: false,
        message: `the file is UTF-16 text (${how}); save it as UTF-8`,
      });
    }
  });

  it('a UTF-8 byte-order mark is allowed, by both', async () => {
    const bytes = new Uint8Array([0xef, 0xbb, 0xbf, ...good()]);
    writeFileSync(join(dir, 'bom.json'), bytes);
    const r = pycno(dir, ['check', 'bom.json']);
    expect(r.code, r.stderr).toBe(0);
    noInternals(r);
    const page = await pickedScenarioText(new Blob([bytes]));
    expect(page.ok).toBe(true);
    expect(page.ok && page.text.charCodeAt(0)).toBe('{'.charCodeAt(0));
  });

  it('a CSV wind file with a bad byte: refused with the file, the byte and its line', () => {
    writeFileSync(
      join(dir, 'bad.csv'),
      new Uint8Array([
        ...new TextEncoder().encode('lon,lat,x,y\n150,0,0.1,0\n151,0,'),
        0xc0,
        0x80,
        ...new TextEncoder().encode(',0\n'),
      ]),
    );
    const f = variant('wind-bad-utf8.json', csvWind('bad.csv'));
    refusedWith(
      pycno(dir, ['check', f]),
      /^pycno: wind-bad-utf8\.json: wind\.parts\[0\]\.source\.path: the wind file .*bad\.csv: the file is not UTF-8 text: byte 30 \(line 3, column 7\) is 0xC0/,
    );
  });

  it('the decoder: truncated, overlong, surrogate and out-of-range sequences each point at their first byte', () => {
    const at = (bytes: number[]) => {
      try {
        decodeUtf8Text(new Uint8Array(bytes));
      } catch (e) {
        expect(e).toBeInstanceOf(TextEncodingError);
        return Number(/byte (\d+)/.exec((e as Error).message)![1]);
      }
      return -1;
    };
    expect(at([0x61, 0x62, 0xe2, 0x82])).toBe(2); // cut short
    expect(at([0x61, 0xc0, 0xaf])).toBe(1); // overlong
    expect(at([0x61, 0x62, 0x63, 0xed, 0xa0, 0x80])).toBe(3); // a surrogate
    expect(at([0xf4, 0x90, 0x80, 0x80])).toBe(0); // above U+10FFFF
    expect(at([0x61, 0x80])).toBe(1); // a continuation byte alone
    expect(at([0xe2, 0x82, 0xac, 0x61])).toBe(-1); // the euro sign is fine
  });
});

describe("the page's picked files: size checked before reading", () => {
  it('a scenario over 16 MiB and a run file over 2 GiB are refused from their size alone', async () => {
    // A Blob whose arrayBuffer() must never be called.
    const claimed = (size: number) =>
      ({ size, arrayBuffer: () => Promise.reject(new Error('read although too large')) }) as unknown as Blob;
    expect(await pickedScenarioText(claimed(17 * 1024 ** 2))).toEqual({
      ok: false,
      message:
        'the file is 17.0 MiB; a scenario file is read only up to 16.0 MiB (put large wind data in a CSV or NetCDF wind file)',
    });
    await expect(pickedBytes(claimed(3 * 1024 ** 3), 'runFile')).rejects.toThrow(
      /^the file is 3\.00 GiB; a run file is read only up to 2\.00 GiB/,
    );
    await expect(pickedBytes(claimed(65 * 1024 ** 2), 'csvWind')).rejects.toThrow(
      /a CSV wind file is read only up to 64\.0 MiB/,
    );
    expect(await pickedBytes(new Blob([new Uint8Array(10)]), 'csvWind')).toHaveLength(10);
  });
});
