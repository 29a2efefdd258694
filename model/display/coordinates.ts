// How the program writes a place: one formatter for the page, the comparison and the report.
// Latitudes "4.25°N", "4.25°S", the equator "0°"; longitudes "59.25°E", "150°W", "0°" and
// "180°"; at most two decimals, trailing zeros dropped. A place is "59.25°E, 7.25°N".

/** Round to two decimals and drop trailing zeros ("4.25", "4.5", "4"). */
function degrees(x: number): string {
  const r = Math.round(Math.abs(x) * 100) / 100;
  return String(r);
}

export function latLabel(lat: number): string {
  if (!Number.isFinite(lat)) return '–';
  const r = Math.round(lat * 100) / 100;
  if (r === 0) return '0°';
  return `${degrees(r)}°${r < 0 ? 'S' : 'N'}`;
}

/** Longitudes folded into (-180, 180]: east positive. */
export function lonLabel(lon: number): string {
  if (!Number.isFinite(lon)) return '–';
  const l = ((((lon + 180) % 360) + 360) % 360) - 180;
  const r = Math.round(l * 100) / 100;
  if (r === 0) return '0°';
  if (Math.abs(r) === 180) return '180°';
  return `${degrees(r)}°${r < 0 ? 'W' : 'E'}`;
}

/** "59.25°E, 7.25°N": longitude first, as a map reads. */
export function placeLabel(lon: number, lat: number): string {
  return `${lonLabel(lon)}, ${latLabel(lat)}`;
}
