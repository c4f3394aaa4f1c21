/**
 * One interactive plot: a canvas for the scene and a transparent canvas on top for highlights,
 * sized to the device pixel ratio; drag to pan, wheel or +/− to zoom, arrow keys to pan, 0 to
 * reset; hover shows a tooltip and highlights the point in every linked plot; click selects it.
 * The zoom is kept in the panel state per plot, so it survives the panel being hidden.
 */
import { button, element } from '../dom';
import type { StateStore, ViewRange } from '../state';
import { panView, plotArea, Projection, zoomView } from './axes';
import { densityLayout, drawDensity, stripPosition, type DensityLayout } from './drawDensity';
import { drawHighlights, drawScatter } from './drawScatter';
import type { HighlightHub } from './highlight';
import { drawLegend } from './legend';
import { PointIndex } from './pointIndex';
import type { PlotScene } from './scene';
import { plotSvg } from './svgExport';
import { readPlotTheme, type PlotTheme } from './theme';

export interface PointDescription {
  heading: string;
  lines: string[];
}

export interface PlotViewOptions {
  scene: PlotScene;
  hub: HighlightHub;
  store: StateStore;
  /** What the tooltip says about a sample point. */
  describePoint: (index: number) => PointDescription;
  /** The plot in words, for screen readers. */
  summary: string;
  onExport: (kind: 'png' | 'svg', fileName: string, data: string) => void;
}

const PICK_RADIUS = 8;
const KEY_ZOOM = 0.8;

/**
 * Points drawn per frame while a pan or zoom is under way: an even subsample (every k-th point of
 * each class) keeps frames near 60 per second up to a million points; the full sample follows
 * SETTLE_MS after the last movement.
 */
export const MOVING_POINT_LIMIT = 100_000;
const SETTLE_MS = 150;

export class PlotView {
  readonly element: HTMLElement;
  private readonly base: HTMLCanvasElement;
  private readonly overlay: HTMLCanvasElement;
  private readonly tooltip: HTMLElement;
  private readonly box: HTMLElement;
  private readonly index: PointIndex | null;
  private width = 0;
  private height = 0;
  private pixelRatio = 1;
  private frame = 0;
  private densityGeometry: DensityLayout | null = null;
  /** The theme of the last draw: hovering and highlighting reuse it instead of reading styles again. */
  private theme: PlotTheme | null = null;
  private readonly unsubscribe: () => void;
  private readonly resizeObserver: ResizeObserver;
  private drag: { x: number; y: number; view: ViewRange; moved: boolean } | null = null;
  private saveTimer = 0;
  /** Set while a pan or zoom is under way (cleared once it pauses): frames then draw fewer points. */
  private moving = false;
  private settleTimer = 0;
  private pendingView: ViewRange | null = null;

  constructor(private readonly options: PlotViewOptions) {
    const { scene } = options;
    this.index = scene.kind === 'scatter' ? new PointIndex(scene.x, scene.y) : null;
    const hintId = `${scene.id}-keys`;
    this.base = element('canvas', { className: 'plot-canvas', attributes: { 'aria-hidden': 'true' } });
    this.overlay = element('canvas', {
      className: 'plot-canvas plot-overlay',
      attributes: { tabindex: 0, role: 'img', 'aria-label': options.summary, 'aria-describedby': hintId, 'data-plot': scene.id },
    });
    this.tooltip = element('div', { className: 'plot-tooltip', attributes: { role: 'status', hidden: true } });
    this.box = element('div', { className: scene.kind === 'scatter' ? 'plot-box' : 'plot-box plot-box-density' }, [this.base, this.overlay, this.tooltip]);
    const toolbar = element('div', { className: 'plot-toolbar' }, [
      button('Reset zoom', () => this.setView(null), { className: 'small-button' }),
      button('Export PNG', () => options.onExport('png', `${scene.id}.png`, this.exportPng()), { className: 'small-button' }),
      button('Export SVG', () => options.onExport('svg', `${scene.id}.svg`, this.exportSvg()), { className: 'small-button' }),
    ]);
    const hint = element('p', { className: 'plot-hint', text: 'Drag or arrow keys to pan, wheel or + and − to zoom, 0 to reset; click a point to select it.', attributes: { id: hintId } });
    this.element = element('figure', { className: 'plot', attributes: { 'data-plot': scene.id } }, [
      element('figcaption', { className: 'plot-title', text: scene.title }),
      this.box,
      toolbar,
      hint,
    ]);
    this.attachInteraction();
    this.unsubscribe = options.hub.subscribe(() => this.drawOverlay());
    this.resizeObserver = new ResizeObserver(() => this.schedule());
    this.resizeObserver.observe(this.box);
  }

  get view(): ViewRange {
    return this.pendingView ?? this.options.store.value.views[this.options.scene.id] ?? this.options.scene.fullView;
  }

  dispose(): void {
    this.unsubscribe();
    this.resizeObserver.disconnect();
    cancelAnimationFrame(this.frame);
    window.clearTimeout(this.saveTimer);
    window.clearTimeout(this.settleTimer);
  }

  /** Redraws on the next animation frame (at most once per frame). */
  schedule(): void {
    if (this.frame) return;
    this.frame = requestAnimationFrame(() => {
      this.frame = 0;
      this.draw();
    });
  }

  /** Draws now; the tests and the export call this directly. */
  draw(): void {
    // The padding box (inside the border) is what the absolutely placed canvases fill.
    const width = Math.max(200, this.box.clientWidth);
    const height = Math.max(160, this.box.clientHeight);
    const ratio = window.devicePixelRatio || 1;
    if (width !== this.width || height !== this.height || ratio !== this.pixelRatio) {
      this.width = width;
      this.height = height;
      this.pixelRatio = ratio;
      for (const canvas of [this.base, this.overlay]) {
        canvas.width = Math.round(width * ratio);
        canvas.height = Math.round(height * ratio);
        canvas.style.width = `${width}px`;
        canvas.style.height = `${height}px`;
      }
    }
    const context = this.base.getContext('2d');
    if (!context) return;
    context.setTransform(ratio, 0, 0, ratio, 0, 0);
    this.theme = readPlotTheme();
    this.render(context, this.width, this.height, this.theme, ratio);
    this.drawOverlay();
  }

  private render(context: CanvasRenderingContext2D, width: number, height: number, theme: PlotTheme, ratio: number): void {
    const { scene } = this.options;
    const area = plotArea(width, height, theme.fontSize);
    if (scene.kind === 'scatter') drawScatter(context, scene, new Projection(this.view, area), theme, this.moving ? MOVING_POINT_LIMIT : Infinity);
    else this.densityGeometry = drawDensity(context, scene, this.view, area, theme);
  }

  private drawOverlay(): void {
    const context = this.overlay.getContext('2d');
    if (!context || this.width === 0 || !this.theme) return;
    context.setTransform(this.pixelRatio, 0, 0, this.pixelRatio, 0, 0);
    drawHighlights(context, this.positioner(), this.options.hub.current, this.theme);
  }

  /** Maps a sample point to its CSS-pixel position in this plot (null when not visible), for the current view. */
  private positioner(): (index: number) => { x: number; y: number } | null {
    const { scene } = this.options;
    const projection = this.projection();
    const { area } = projection;
    const layout = scene.kind === 'density' ? (this.densityGeometry ?? densityLayout(scene, this.view, area)) : null;
    return (index) => {
      let point: { x: number; y: number } | null;
      if (scene.kind === 'scatter') {
        point = Number.isFinite(scene.x[index]) && Number.isFinite(scene.y[index]) ? { x: projection.x(scene.x[index]), y: projection.y(scene.y[index]) } : null;
      } else {
        point = layout ? stripPosition(scene, layout, index) : null;
      }
      if (!point || point.x < area.left || point.x > area.right || point.y < area.top || point.y > area.bottom) return null;
      return point;
    };
  }

  private projection(): Projection {
    return new Projection(this.view, plotArea(this.width, this.height, (this.theme ?? readPlotTheme()).fontSize));
  }

  /** The sample point under a CSS-pixel position, or -1. */
  private pick(px: number, py: number): number {
    const { scene } = this.options;
    const projection = this.projection();
    if (!projection.inside(px, py)) return -1;
    if (scene.kind === 'scatter' && this.index) {
      return this.index.nearest(projection.dataX(px), projection.dataY(py), PICK_RADIUS, projection.scaleX, projection.scaleY);
    }
    if (scene.kind !== 'density' || !this.densityGeometry || !scene.strip) return -1;
    const layout = this.densityGeometry;
    const row = Math.floor((py - layout.stripTop) / layout.rowHeight);
    if (row < 0 || row >= scene.members.length) return -1;
    let best = -1;
    let bestDistance = PICK_RADIUS * PICK_RADIUS;
    for (const i of scene.members[row]) {
      const point = stripPosition(scene, layout, i);
      if (!point) continue;
      const distance = (point.x - px) ** 2 + (point.y - py) ** 2;
      if (distance <= bestDistance) {
        best = i;
        bestDistance = distance;
      }
    }
    return best;
  }

  private setView(view: ViewRange | null): void {
    window.clearTimeout(this.saveTimer);
    this.pendingView = view;
    // While the view moves, frames draw an even subsample of a very large sample; once the
    // gesture pauses, the whole sample is drawn again.
    this.moving = true;
    window.clearTimeout(this.settleTimer);
    this.settleTimer = window.setTimeout(() => {
      this.moving = false;
      this.schedule();
    }, SETTLE_MS);
    this.schedule();
    if (!view) {
      this.options.store.setView(this.options.scene.id, null);
      return;
    }
    // Writing the state on every wheel step is wasteful; store the view once the gesture settles.
    this.saveTimer = window.setTimeout(() => {
      this.options.store.setView(this.options.scene.id, this.pendingView);
      this.pendingView = null;
    }, 250);
  }

  private zoom(factor: number, px?: number, py?: number): void {
    const projection = this.projection();
    const view = this.view;
    const cx = px === undefined ? (view.x0 + view.x1) / 2 : projection.dataX(px);
    const cy = py === undefined ? (view.y0 + view.y1) / 2 : projection.dataY(py);
    this.setView(zoomView(view, factor, cx, cy, this.options.scene.kind === 'density'));
  }

  private showTooltip(index: number, px: number, py: number): void {
    if (index < 0) {
      this.tooltip.hidden = true;
      return;
    }
    const description = this.options.describePoint(index);
    this.tooltip.replaceChildren(
      element('strong', { text: description.heading }),
      ...description.lines.map((line) => element('div', { text: line })),
    );
    this.tooltip.hidden = false;
    const flip = px > this.width * 0.6;
    this.tooltip.style.left = flip ? '' : `${px + 14}px`;
    this.tooltip.style.right = flip ? `${this.width - px + 14}px` : '';
    this.tooltip.style.top = `${Math.min(py + 10, this.height - 20)}px`;
  }

  private attachInteraction(): void {
    const canvas = this.overlay;
    const { hub, scene } = this.options;
    const local = (event: MouseEvent): [number, number] => {
      const rect = canvas.getBoundingClientRect();
      return [event.clientX - rect.left, event.clientY - rect.top];
    };
    canvas.addEventListener('pointerdown', (event) => {
      if (event.button !== 0) return;
      const [x, y] = local(event);
      this.drag = { x, y, view: this.view, moved: false };
      canvas.setPointerCapture(event.pointerId);
    });
    canvas.addEventListener('pointermove', (event) => {
      const [x, y] = local(event);
      const drag = this.drag;
      if (drag && (drag.moved || Math.hypot(x - drag.x, y - drag.y) > 3)) {
        drag.moved = true;
        const projection = new Projection(drag.view, plotArea(this.width, this.height, (this.theme ?? readPlotTheme()).fontSize));
        const dy = scene.kind === 'density' ? 0 : (y - drag.y) / projection.scaleY;
        this.setView(panView(drag.view, -(x - drag.x) / projection.scaleX, dy));
        this.showTooltip(-1, 0, 0);
        return;
      }
      const index = this.pick(x, y);
      hub.hover(index);
      this.showTooltip(index, x, y);
    });
    canvas.addEventListener('pointerup', (event) => {
      const drag = this.drag;
      this.drag = null;
      if (canvas.hasPointerCapture(event.pointerId)) canvas.releasePointerCapture(event.pointerId);
      if (drag && !drag.moved) {
        const [x, y] = local(event);
        hub.select(this.pick(x, y));
      }
    });
    canvas.addEventListener('pointerleave', () => {
      hub.hover(-1);
      this.showTooltip(-1, 0, 0);
    });
    canvas.addEventListener(
      'wheel',
      (event) => {
        event.preventDefault();
        const [x, y] = local(event);
        this.zoom(Math.exp(Math.max(-1, Math.min(1, event.deltaY * 0.002))), x, y);
      },
      { passive: false },
    );
    canvas.addEventListener('keydown', (event) => {
      const view = this.view;
      const stepX = (view.x1 - view.x0) * 0.1;
      const stepY = scene.kind === 'density' ? 0 : (view.y1 - view.y0) * 0.1;
      const actions: Record<string, () => void> = {
        '+': () => this.zoom(KEY_ZOOM),
        '=': () => this.zoom(KEY_ZOOM),
        '-': () => this.zoom(1 / KEY_ZOOM),
        _: () => this.zoom(1 / KEY_ZOOM),
        '0': () => this.setView(null),
        Home: () => this.setView(null),
        ArrowLeft: () => this.setView(panView(view, -stepX, 0)),
        ArrowRight: () => this.setView(panView(view, stepX, 0)),
        ArrowUp: () => this.setView(panView(view, 0, stepY)),
        ArrowDown: () => this.setView(panView(view, 0, -stepY)),
        Escape: () => hub.select(-1),
      };
      const action = actions[event.key];
      if (!action) return;
      event.preventDefault();
      action();
    });
  }

  /** The plot with a title and a legend, at twice the screen resolution, as a PNG data URL. */
  exportPng(): string {
    const theme = readPlotTheme();
    const { scene } = this.options;
    const width = this.width || 640;
    const height = this.height || 400;
    const scale = 2;
    const titleHeight = theme.fontSize * 2;
    const canvas = document.createElement('canvas');
    const probe = canvas.getContext('2d');
    if (!probe) throw new Error('The canvas cannot be drawn on.');
    const legendHeight = drawLegend(probe, scene.classes, 12, 0, width - 24, theme, false);
    canvas.width = width * scale;
    canvas.height = Math.ceil(titleHeight + height + legendHeight + 8) * scale;
    const context = canvas.getContext('2d') as CanvasRenderingContext2D;
    context.setTransform(scale, 0, 0, scale, 0, 0);
    context.fillStyle = theme.background;
    context.fillRect(0, 0, width, canvas.height / scale);
    context.fillStyle = theme.foreground;
    context.font = `bold ${theme.fontSize}px ${theme.fontFamily}`;
    context.textBaseline = 'middle';
    context.fillText(scene.title, 12, titleHeight / 2);
    context.save();
    context.translate(0, titleHeight);
    this.render(context, width, height, theme, scale);
    context.restore();
    drawLegend(context, scene.classes, 12, titleHeight + height + 4, width - 24, theme);
    return canvas.toDataURL('image/png');
  }

  exportSvg(): string {
    return plotSvg(this.options.scene, this.view, this.width || 640, this.height || 400, readPlotTheme());
  }
}
