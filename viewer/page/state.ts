// What the page is showing and doing, in one object the page's parts share (instead of loose
// variables): the run on screen, the engine's status, the frame looked at, the field, the cells
// under the cursor and the pointer.

import type { EngineStatus, Frame, LoadedScenario } from '../../worker/protocol.ts';
import type { DisplayKey } from '../state/display-fields.ts';
import type { FrameHistory, KeptFrame } from '../state/frame-history.ts';

export interface Cell {
  i: number;
  j: number;
}

export interface PageState {
  /** The run the engine holds and the page shows, null before a scenario loaded (or after a failed load). */
  run: LoadedScenario | null;
  status: EngineStatus;
  /** Index into the frame history while scrubbing, null to follow the latest frame. */
  viewIndex: number | null;
  fieldKey: DisplayKey;
  /** The cell picked by click or keys, and the one under the pointer. */
  cursor: Cell | null;
  hover: Cell | null;
  /** True while a scenario loads: frames that arrive meanwhile wait in `early`. */
  loading: boolean;
  early: Frame[];
}

export function newPageState(): PageState {
  return {
    run: null,
    status: 'empty',
    viewIndex: null,
    fieldKey: 'h_anom',
    cursor: null,
    hover: null,
    loading: false,
    early: [],
  };
}

/** The frame on screen: the one scrubbed to, or the latest. */
export function shownFrame(state: PageState, history: FrameHistory): KeptFrame | null {
  return state.viewIndex !== null ? history.at(state.viewIndex) : history.latest();
}
