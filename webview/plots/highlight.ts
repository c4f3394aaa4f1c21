/**
 * Linked highlighting: the discriminant and PCA plots draw the same sampled rows, so a point is
 * identified by its index into report.sample. Hovering or selecting it in one plot marks it in
 * every plot; a selected finding marks all of its rows that are in the sample.
 */
export interface HighlightState {
  /** Sample index under the pointer, or -1. */
  hovered: number;
  /** Sample index clicked (or chosen by keyboard), or -1. */
  selected: number;
  /** Sample indices of the selected finding's rows. */
  marked: readonly number[];
}

type Listener = (state: HighlightState) => void;

export class HighlightHub {
  private state: HighlightState = { hovered: -1, selected: -1, marked: [] };
  private readonly listeners = new Set<Listener>();

  get current(): HighlightState {
    return this.state;
  }

  subscribe(listener: Listener): () => void {
    this.listeners.add(listener);
    return () => this.listeners.delete(listener);
  }

  hover(index: number): void {
    if (index !== this.state.hovered) this.set({ ...this.state, hovered: index });
  }

  select(index: number): void {
    if (index !== this.state.selected) this.set({ ...this.state, selected: index });
  }

  mark(indices: readonly number[]): void {
    this.set({ ...this.state, marked: indices });
  }

  private set(state: HighlightState): void {
    this.state = state;
    for (const listener of this.listeners) listener(state);
  }
}
