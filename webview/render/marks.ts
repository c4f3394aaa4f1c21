/**
 * Column marks: elements that stand for a feature (a row of the feature table, a removed feature)
 * register here, and selecting a finding marks those of the columns it names.
 */
export class ColumnMarks {
  private readonly byColumn = new Map<string, HTMLElement[]>();
  private marked = new Set<string>();

  /** Adds an element for a column; it is marked at once if its column is. */
  register(column: string, node: HTMLElement): void {
    const list = this.byColumn.get(column);
    if (list) list.push(node);
    else this.byColumn.set(column, [node]);
    node.classList.toggle('is-marked', this.marked.has(column));
  }

  /** Marks exactly the given columns' elements (none when the list is empty). */
  mark(columns: readonly string[]): void {
    this.marked = new Set(columns);
    for (const [column, nodes] of this.byColumn) {
      // Elements of a table that was drawn again are no longer in the page: forget them.
      const live = nodes.filter((node) => node.isConnected);
      this.byColumn.set(column, live);
      for (const node of live) node.classList.toggle('is-marked', this.marked.has(column));
    }
  }
}
