// Grid lines and their labels on a 2-D canvas plot: vertical lines labelled below the box,
// horizontal lines labelled to its left, and the frame. The map, the Hovmoller diagram and the
// comparison's diagrams all draw their axes with this.

export interface PlotBox {
  x: number;
  y: number;
  w: number;
  h: number;
}

export interface AxisLines {
  /** Values where lines go, and where each lands in canvas pixels (x for the vertical set, y for the horizontal). */
  values: number[];
  at(value: number): number;
  label(value: number): string;
  /** Stroke of one line (e.g. the equator darker); default the common stroke. */
  stroke?(value: number): string | undefined;
}

export function drawAxes(
  ctx: CanvasRenderingContext2D,
  box: PlotBox,
  vertical: AxisLines,
  horizontal: AxisLines,
  stroke: string,
): void {
  ctx.textAlign = 'center';
  ctx.textBaseline = 'top';
  for (const v of vertical.values) {
    const x = vertical.at(v);
    ctx.strokeStyle = vertical.stroke?.(v) ?? stroke;
    ctx.beginPath();
    ctx.moveTo(x + 0.5, box.y);
    ctx.lineTo(x + 0.5, box.y + box.h);
    ctx.stroke();
    ctx.fillText(vertical.label(v), x, box.y + box.h + 4);
  }
  ctx.textAlign = 'right';
  ctx.textBaseline = 'middle';
  for (const v of horizontal.values) {
    const y = horizontal.at(v);
    ctx.strokeStyle = horizontal.stroke?.(v) ?? stroke;
    ctx.beginPath();
    ctx.moveTo(box.x, y + 0.5);
    ctx.lineTo(box.x + box.w, y + 0.5);
    ctx.stroke();
    ctx.fillText(horizontal.label(v), box.x - 4, y);
  }
  ctx.strokeStyle = '#333';
  ctx.strokeRect(box.x + 0.5, box.y + 0.5, box.w - 1, box.h - 1);
}
