// The page's parts, made once by main.ts and handed to the files that wire them: the shared state,
// the map, the kept frames and series, the panels, the engine. The files that act on them (the draw
// loop, the run lifecycle, the inputs) take this and the few collaborators they call.

import type { EngineClient } from '../engine-client.ts';
import type { LibraryPage } from '../library-panel/library-page.ts';
import type { HovmollerPanel } from '../panels/hovmoller.ts';
import type { ProbePanel } from '../panels/probes.ts';
import type { CoupledPanel } from '../panels/coupled-panel.ts';
import type { RunTotals } from '../panels/run-totals.ts';
import type { ScenarioPanel } from '../panels/scenario-panel.ts';
import type { MapView } from '../render/map-view.ts';
import type { FrameHistory } from '../state/frame-history.ts';
import type { HovmollerStore } from '../state/hovmoller-store.ts';
import type { ProbeStore } from '../state/probe-store.ts';
import type { WindPanel } from '../wind/wind-panel.ts';
import type { Notices } from './notices.ts';
import type { PageInfo } from './page-info.ts';
import type { PageState } from './state.ts';

export interface Page {
  readonly state: PageState;
  readonly info: PageInfo;
  readonly notices: Notices;
  readonly map: MapView;
  /** Full frames kept for the time slider. */
  readonly history: FrameHistory;
  /** Every output sample's Hovmoller rows and probe values. */
  readonly hov: HovmollerStore;
  readonly probes: ProbeStore;
  readonly totals: RunTotals;
  /** The coupled run's SST, answering wind and indices (hidden for uncoupled runs). */
  readonly coupledPanel: CoupledPanel;
  readonly panel: ScenarioPanel;
  readonly hovPanel: HovmollerPanel;
  readonly probePanel: ProbePanel;
  readonly windPanel: WindPanel;
  readonly library: LibraryPage;
  readonly engine: EngineClient;
}
