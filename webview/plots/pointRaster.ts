/**
 * Points written straight into the canvas's pixels. Filling a path of thousands of markers goes
 * through the general path rasterizer point by point; here each class's marker is rendered once
 * into a small coverage mask (antialiased, in its shape), and every point blends that mask into
 * the pixel buffer with the class colour: a few dozen multiply-adds per point, so 50 000 points
 * take milliseconds and a million stay usable. The canvas under the points is opaque (the plot
 * background is filled first), so "source over" blending needs no destination alpha.
 */
import type { MarkerShape } from '../palette';
import { traceMarker } from './markers';

export interface CoverageMask {
  size: number;
  /** The pixels the marker touches: column and row within the mask, and coverage in (0, 1]. */
  columns: Int32Array;
  rows: Int32Array;
  coverage: Float32Array;
}

const masks = new Map<string, CoverageMask>();

/** The marker's coverage at a radius in device pixels (cached per shape and radius). */
export function coverageMask(shape: MarkerShape, radius: number): CoverageMask {
  const key = `${shape}:${radius.toFixed(2)}`;
  const cached = masks.get(key);
  if (cached) return cached;
  const size = Math.ceil(radius * 2.6) + 2;
  const canvas = document.createElement('canvas');
  canvas.width = size;
  canvas.height = size;
  const context = canvas.getContext('2d') as CanvasRenderingContext2D;
  context.fillStyle = '#ffffff';
  context.beginPath();
  traceMarker(context, shape, size / 2, size / 2, radius);
  context.fill();
  const pixels = context.getImageData(0, 0, size, size).data;
  const touched: number[] = [];
  for (let i = 0; i < size * size; i++) if (pixels[i * 4 + 3] > 0) touched.push(i);
  const mask = {
    size,
    columns: Int32Array.from(touched, (i) => i % size),
    rows: Int32Array.from(touched, (i) => Math.floor(i / size)),
    coverage: Float32Array.from(touched, (i) => pixels[i * 4 + 3] / 255),
  };
  masks.set(key, mask);
  return mask;
}

/** A rectangle of the canvas in device pixels. */
export interface DeviceRect {
  left: number;
  top: number;
  width: number;
  height: number;
}

export interface PointLayer {
  colour: readonly [number, number, number];
  mask: CoverageMask;
  /** Device-pixel positions of the layer's points, x then y, as many as `count`. */
  positions: Float32Array;
  count: number;
}

/**
 * Blends point layers into the canvas within `rect` (device pixels), in the order given, at the
 * given opacity. Reads and writes the pixels once for all layers.
 */
export function blendPoints(context: CanvasRenderingContext2D, rect: DeviceRect, layers: readonly PointLayer[], alpha: number): void {
  const left = Math.max(0, Math.floor(rect.left));
  const top = Math.max(0, Math.floor(rect.top));
  const width = Math.min(context.canvas.width - left, Math.ceil(rect.width));
  const height = Math.min(context.canvas.height - top, Math.ceil(rect.height));
  if (width <= 0 || height <= 0) return;
  const image = context.getImageData(left, top, width, height);
  // A plain byte view of the same pixels: the blend stays within 0–255, so the clamping of the
  // image's own array is not needed, and +0.5 makes the truncating store round.
  const data = new Uint8Array(image.data.buffer, image.data.byteOffset, image.data.length);
  for (const layer of layers) {
    const { size, columns, rows, coverage } = layer.mask;
    const touched = coverage.length;
    const half = size / 2;
    const [r, g, b] = layer.colour;
    // Offsets of the touched pixels from the mask's corner, in bytes of this image.
    const offsets = new Int32Array(touched);
    for (let k = 0; k < touched; k++) offsets[k] = (rows[k] * width + columns[k]) * 4;
    const weights = new Float32Array(touched);
    for (let k = 0; k < touched; k++) weights[k] = coverage[k] * alpha;
    const positions = layer.positions;
    for (let p = 0; p < layer.count; p++) {
      const x0 = Math.round(positions[2 * p] - half) - left;
      const y0 = Math.round(positions[2 * p + 1] - half) - top;
      if (x0 >= width || y0 >= height || x0 + size <= 0 || y0 + size <= 0) continue;
      if (x0 >= 0 && y0 >= 0 && x0 + size <= width && y0 + size <= height) {
        // The whole marker is inside: no per-pixel bounds checks.
        const corner = (y0 * width + x0) * 4;
        for (let k = 0; k < touched; k++) {
          const o = corner + offsets[k];
          const a = weights[k];
          data[o] = data[o] + (r - data[o]) * a + 0.5;
          data[o + 1] = data[o + 1] + (g - data[o + 1]) * a + 0.5;
          data[o + 2] = data[o + 2] + (b - data[o + 2]) * a + 0.5;
        }
        continue;
      }
      for (let k = 0; k < touched; k++) {
        const x = x0 + columns[k];
        const y = y0 + rows[k];
        if (x < 0 || x >= width || y < 0 || y >= height) continue;
        const o = (y * width + x) * 4;
        const a = weights[k];
        data[o] = data[o] + (r - data[o]) * a + 0.5;
        data[o + 1] = data[o + 1] + (g - data[o + 1]) * a + 0.5;
        data[o + 2] = data[o + 2] + (b - data[o + 2]) * a + 0.5;
      }
    }
  }
  context.putImageData(image, left, top);
}

/** "#0072B2" → [0, 114, 178]. */
export function hexColour(hex: string): [number, number, number] {
  return [1, 3, 5].map((i) => parseInt(hex.slice(i, i + 2), 16)) as [number, number, number];
}
