/**
 * A uniform grid over the points' data range, so finding the point under the pointer looks at a
 * few cells instead of every point (the plots may hold a million points). Built once per scene.
 */
export class PointIndex {
  private readonly cellsX: number;
  private readonly cellsY: number;
  private readonly x0: number;
  private readonly y0: number;
  private readonly cellWidth: number;
  private readonly cellHeight: number;
  /** cellStart[c] .. cellStart[c + 1] index into `order`. */
  private readonly cellStart: Int32Array;
  private readonly order: Int32Array;

  constructor(private readonly x: Float64Array, private readonly y: Float64Array) {
    let xLow = Infinity;
    let xHigh = -Infinity;
    let yLow = Infinity;
    let yHigh = -Infinity;
    let finite = 0;
    for (let i = 0; i < x.length; i++) {
      if (!Number.isFinite(x[i]) || !Number.isFinite(y[i])) continue;
      finite++;
      xLow = Math.min(xLow, x[i]);
      xHigh = Math.max(xHigh, x[i]);
      yLow = Math.min(yLow, y[i]);
      yHigh = Math.max(yHigh, y[i]);
    }
    // About four points per cell, at most 512 cells a side.
    const side = Math.max(1, Math.min(512, Math.round(Math.sqrt(finite / 4))));
    this.cellsX = side;
    this.cellsY = side;
    this.x0 = finite > 0 ? xLow : 0;
    this.y0 = finite > 0 ? yLow : 0;
    this.cellWidth = finite > 0 && xHigh > xLow ? (xHigh - xLow) / side : 1;
    this.cellHeight = finite > 0 && yHigh > yLow ? (yHigh - yLow) / side : 1;
    const cellOf = new Int32Array(x.length);
    const counts = new Int32Array(side * side + 1);
    for (let i = 0; i < x.length; i++) {
      if (!Number.isFinite(x[i]) || !Number.isFinite(y[i])) {
        cellOf[i] = -1;
        continue;
      }
      const cell = this.cellY(y[i]) * side + this.cellX(x[i]);
      cellOf[i] = cell;
      counts[cell + 1]++;
    }
    for (let c = 0; c < side * side; c++) counts[c + 1] += counts[c];
    this.cellStart = counts;
    this.order = new Int32Array(finite);
    const filled = counts.slice(0, side * side);
    for (let i = 0; i < x.length; i++) if (cellOf[i] >= 0) this.order[filled[cellOf[i]]++] = i;
  }

  private cellX(value: number): number {
    return Math.min(this.cellsX - 1, Math.max(0, Math.floor((value - this.x0) / this.cellWidth)));
  }

  private cellY(value: number): number {
    return Math.min(this.cellsY - 1, Math.max(0, Math.floor((value - this.y0) / this.cellHeight)));
  }

  /**
   * The point nearest to (px, py) in screen distance, within `radius` pixels, or -1.
   * `scaleX`/`scaleY` are pixels per data unit; `accept` filters points (e.g. hidden classes).
   */
  nearest(px: number, py: number, radius: number, scaleX: number, scaleY: number, accept: (index: number) => boolean = () => true): number {
    const dataX = radius / scaleX;
    const dataY = radius / scaleY;
    const cx0 = this.cellX(px - dataX);
    const cx1 = this.cellX(px + dataX);
    const cy0 = this.cellY(py - dataY);
    const cy1 = this.cellY(py + dataY);
    let best = -1;
    let bestDistance = radius * radius;
    for (let cy = cy0; cy <= cy1; cy++) {
      for (let cx = cx0; cx <= cx1; cx++) {
        const cell = cy * this.cellsX + cx;
        for (let k = this.cellStart[cell]; k < this.cellStart[cell + 1]; k++) {
          const i = this.order[k];
          const distance = ((this.x[i] - px) * scaleX) ** 2 + ((this.y[i] - py) * scaleY) ** 2;
          if (distance <= bestDistance && accept(i)) {
            best = i;
            bestDistance = distance;
          }
        }
      }
    }
    return best;
  }
}
