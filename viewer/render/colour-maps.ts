// Which of Pycno's colour maps (model/display/colour-maps.ts, shared with the report) a display
// field is drawn with: the anomaly map for signed fields, the depth map for the thermocline
// depth, the strength map for speeds and the wind stress.

import type { DisplayKey } from '../state/display-fields.ts';
import type { MapName } from '../../model/display/colour-maps.ts';

export {
  colourAt,
  LAND_GREY,
  LUT_SIZE,
  lookupTable,
  MAP_TITLES,
  type MapName,
} from '../../model/display/colour-maps.ts';

export function mapFor(key: DisplayKey): MapName {
  if (key === 'depth') return 'depth';
  if (key === 'speed' || key === 'surf_speed' || key === 'stress' || key === 'atm_speed') return 'strength';
  return 'anomaly';
}
