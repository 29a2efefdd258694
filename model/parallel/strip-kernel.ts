// What computes the rows of one strip's phases (the schedule itself is strip-schedule.ts and the
// team's barriers): the TypeScript row functions over SharedArrayBuffers, or the WebAssembly
// kernel over one shared WebAssembly.Memory (wasm-strips.ts). Both give the bits of
// linearStepPlain. `cur` says which of the two velocity buffers holds the current state.

import type { RowCoefficients, RowGrid } from '../dynamics/linear.ts';
import type { SharedFields } from './strip-protocol.ts';
import { stripBack, stripBulk, stripEdge, stripFront, type StripFields, type StripRows } from './strip-schedule.ts';

export type StripKernelName = 'ts' | 'wasm';

export interface StripKernel {
  front(cur: number, friction: number, viscosity: number): void;
  bulk(cur: number, friction: number, viscosity: number): void;
  back(cur: number): void;
  edge(cur: number): void;
}

/** The two field sets of a team: current state in buffer cur, new velocities in 1 - cur. */
export function fieldSets(fields: SharedFields): StripFields[] {
  return [0, 1].map((cur) => ({
    accelX: fields.accelX,
    accelY: fields.accelY,
    u: fields.u[cur],
    v: fields.v[cur],
    h: fields.h,
    un: fields.u[1 - cur],
    vn: fields.v[1 - cur],
  }));
}

export function tsStripKernel(g: RowGrid, c: RowCoefficients, fields: SharedFields, rows: StripRows): StripKernel {
  const sets = fieldSets(fields);
  return {
    front: (cur, r, A) => stripFront(g, c, r, A, sets[cur], rows),
    bulk: (cur, r, A) => stripBulk(g, c, r, A, sets[cur], rows),
    back: (cur) => stripBack(g, c, sets[cur], rows),
    edge: (cur) => stripEdge(g, c, sets[cur], rows),
  };
}
