// The block encoder for float and double (typed-array input) must write the same bytes as the
// per-value DataView path (plain-array input), at any byte offset.

import { describe, expect, it } from 'vitest';
import { encodeNumbers, NC_DOUBLE, NC_FLOAT } from '../../model/io/netcdf-format.ts';

const special = [0, -0, 1, -1, 1e-40, 3.4e38, 1e39, -1e-310, Math.PI, NaN, Infinity, -Infinity, 2 ** -149];

function sample(n: number): Float64Array {
  const a = new Float64Array(n);
  for (let k = 0; k < n; k++) a[k] = k < special.length ? special[k] : Math.sin(k * 0.37) * 10 ** ((k % 17) - 8);
  return a;
}

describe('NetCDF float block encoding', () => {
  for (const [type, size] of [
    [NC_FLOAT, 4],
    [NC_DOUBLE, 8],
  ] as const) {
    for (const input of ['f64', 'f32'] as const) {
      it(`type ${type === NC_FLOAT ? 'float' : 'double'} from ${input}: same bytes as the DataView path`, () => {
        const n = 9000; // more than one block
        const src = input === 'f64' ? sample(n) : Float32Array.from(sample(n));
        for (const at of [0, 3, 8]) {
          const fast = new DataView(new ArrayBuffer(n * size + 16));
          const slow = new DataView(new ArrayBuffer(n * size + 16));
          encodeNumbers(type, src, 5, n, fast, at);
          encodeNumbers(type, Array.from(src), 5, n, slow, at);
          expect(new Uint8Array(fast.buffer)).toEqual(new Uint8Array(slow.buffer));
        }
      });
    }
  }
});
