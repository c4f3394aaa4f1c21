/** Markers on a canvas, traced into the current path so a whole class fills in one call. */
import { shapeVertices, type MarkerShape } from '../palette';

/** Adds one marker as a sub-path of the current canvas path (no per-point path objects). */
export function traceMarker(context: CanvasRenderingContext2D, shape: MarkerShape, x: number, y: number, radius: number): void {
  if (shape === 'circle') {
    context.moveTo(x + radius, y);
    context.arc(x, y, radius, 0, 2 * Math.PI);
    return;
  }
  const vertices = shapeVertices(shape);
  context.moveTo(x + vertices[0][0] * radius, y + vertices[0][1] * radius);
  for (let i = 1; i < vertices.length; i++) context.lineTo(x + vertices[i][0] * radius, y + vertices[i][1] * radius);
  context.closePath();
}
