/**
 * What the panel remembers while hidden: the open tab, the discriminant pair shown, each plot's
 * zoom, the selected finding and the role-form edits. Kept in the webview's setState/getState, so it
 * survives the panel being hidden and shown again; everything read back is checked, since a stored
 * state may come from an older panel.
 */
import { isFromPanel, type EditableOptions } from '../src/shared/messages';
import type { HostConnection } from './vscodeApi';

export const TABS = ['projections', 'features', 'classes', 'statistics', 'findings', 'columns'] as const;
export type TabId = (typeof TABS)[number];

/** A plot's visible data range. */
export interface ViewRange {
  x0: number;
  x1: number;
  y0: number;
  y1: number;
}

export interface PanelState {
  tab: TabId;
  /** 0-based discriminant indices on the x and y axes of the discriminant scatter. */
  discriminantAxes: [number, number];
  /** Visible range per plot, keyed by plot id (which includes the axes shown). */
  views: Record<string, ViewRange>;
  confusion: 'training' | 'crossValidated';
  /** Index into report.findings. */
  selectedFinding: number | null;
  /** Data row (0-based) of the selected point; a row, not a sample index, so it means the same after a refit. */
  selectedPoint: number | null;
  /** The role form as edited, not yet refitted. */
  roleEdits: EditableOptions | null;
}

export function initialState(): PanelState {
  return {
    tab: 'projections',
    discriminantAxes: [0, 1],
    views: {},
    confusion: 'crossValidated',
    selectedFinding: null,
    selectedPoint: null,
    roleEdits: null,
  };
}

const isRecord = (v: unknown): v is Record<string, unknown> => typeof v === 'object' && v !== null;
const isIndex = (v: unknown): v is number => Number.isInteger(v) && (v as number) >= 0;

function readView(v: unknown): ViewRange | null {
  if (!isRecord(v)) return null;
  const { x0, x1, y0, y1 } = v;
  const finite = [x0, x1, y0, y1].every((n) => typeof n === 'number' && Number.isFinite(n));
  if (!finite || (x1 as number) <= (x0 as number) || (y1 as number) <= (y0 as number)) return null;
  return { x0: x0 as number, x1: x1 as number, y0: y0 as number, y1: y1 as number };
}

/** Reads a stored state, keeping each field that is well formed and defaulting the rest. */
export function readState(stored: unknown): PanelState {
  const state = initialState();
  if (!isRecord(stored)) return state;
  if (TABS.includes(stored.tab as TabId)) state.tab = stored.tab as TabId;
  const axes = stored.discriminantAxes;
  if (Array.isArray(axes) && axes.length === 2 && axes.every(isIndex) && axes[0] !== axes[1]) state.discriminantAxes = [axes[0], axes[1]];
  if (isRecord(stored.views)) {
    for (const [key, value] of Object.entries(stored.views)) {
      const view = readView(value);
      if (view) state.views[key] = view;
    }
  }
  if (stored.confusion === 'training' || stored.confusion === 'crossValidated') state.confusion = stored.confusion;
  if (isIndex(stored.selectedFinding)) state.selectedFinding = stored.selectedFinding;
  if (isIndex(stored.selectedPoint)) state.selectedPoint = stored.selectedPoint;
  // The refit message's guard is the one check of EditableOptions both sides share.
  const refit = { type: 'refit', options: stored.roleEdits };
  if (isFromPanel(refit) && refit.type === 'refit') state.roleEdits = refit.options;
  return state;
}

/** The one mutable copy of the state; every change is written through to the host at once. */
export class StateStore {
  private current: PanelState;

  constructor(private readonly host: HostConnection) {
    this.current = readState(host.getState());
  }

  get value(): Readonly<PanelState> {
    return this.current;
  }

  update(change: Partial<PanelState>): void {
    this.current = { ...this.current, ...change };
    this.host.setState(this.current);
  }

  setView(plotId: string, view: ViewRange | null): void {
    const views = { ...this.current.views };
    if (view) views[plotId] = view;
    else delete views[plotId];
    this.update({ views });
  }
}
