/**
 * The panel: reacts to the host's messages (init, progress, result, error, comparison) and draws
 * the header, the progress strip and the current view. Holds no data but the last message of each
 * kind, so a theme change or a new result simply draws again.
 */
import type { FitReport } from '../../src/core/types';
import type { ColumnChoice, ComparisonMessage, EditableOptions, ErrorMessage, PanelSettings, ProgressMessage, ToPanel } from '../../src/shared/messages';
import { unpackReport, type PackedSample } from '../../src/shared/packedSample';
import { button, clear, element } from '../dom';
import type { StateStore } from '../state';
import type { HostConnection } from '../vscodeApi';
import { renderComparison } from './comparison';
import { renderReport, type RenderedReport } from './report';
import { errorView, progressStrip } from './status';

/** A comparison as the panel keeps it: both reports with their plot samples unpacked. */
export type ShownComparison = Omit<ComparisonMessage, 'base' | 'head'> & { base: FitReport; head: FitReport };

/** `folder/pump-faults.csv` → `pump-faults`, reduced to characters safe in any file name. */
export function fileStem(name: string): string {
  const base = name.split(/[\\/]/).pop() ?? name;
  const stem = base.replace(/\.[^.]*$/, '').replace(/[^A-Za-z0-9._-]+/g, '_');
  return stem || 'scatterwise';
}

/** Whether two option sets choose the same fit (features compared in order, as they are fitted). */
function sameOptions(a: EditableOptions | null, b: EditableOptions): boolean {
  if (!a) return false;
  return a.label === b.label && a.solver === b.solver && a.priors === b.priors && a.cv === b.cv && a.missing === b.missing && JSON.stringify(a.features ?? null) === JSON.stringify(b.features ?? null);
}

export class PanelApp {
  private fileName = '';
  private settings: PanelSettings | null = null;
  private report: FitReport | null = null;
  /** The result's sample in typed columns, as it arrived (for the plots). */
  private packedSample: PackedSample | undefined;
  private comparison: ShownComparison | null = null;
  private error: ErrorMessage | null = null;
  private columns: readonly ColumnChoice[] = [];
  private options: EditableOptions | null = null;
  private rendered: RenderedReport | null = null;
  private readonly header = element('header', { className: 'panel-header' });
  private readonly status = element('div', { className: 'status-area' });
  private readonly content = element('div', { className: 'content' });

  constructor(private readonly root: HTMLElement, private readonly host: HostConnection, private readonly store: StateStore) {
    clear(root);
    root.append(this.header, this.status, this.content);
    this.content.appendChild(element('p', { className: 'app-waiting', text: 'Waiting for the analysis…' }));
  }

  receive(message: ToPanel): void {
    switch (message.type) {
      case 'init':
        this.fileName = message.fileName;
        this.settings = message.settings;
        this.drawHeader();
        break;
      case 'progress':
        this.showProgress(message);
        break;
      case 'result':
        // The sample arrives packed in typed arrays (cheap to post and clone); the panel's code reads rows.
        this.report = unpackReport(message.report);
        this.packedSample = message.report.sample;
        this.columns = message.columns;
        this.options = message.options;
        // Edits that this result was fitted with are no longer pending.
        if (sameOptions(this.store.value.roleEdits, message.options)) this.store.update({ roleEdits: null });
        this.error = null;
        this.comparison = null;
        this.showProgress(null);
        this.draw();
        break;
      case 'error':
        this.error = message;
        if (message.columns) this.columns = message.columns;
        if (message.options) this.options = message.options;
        this.showProgress(null);
        this.draw();
        break;
      case 'comparison':
        this.comparison = { ...message, base: unpackReport(message.base), head: unpackReport(message.head) };
        this.report = this.comparison.head;
        this.packedSample = message.head.sample;
        this.error = null;
        this.draw();
        break;
    }
  }

  /** Draws the current view again (after a theme change, say). */
  draw(): void {
    this.drawHeader();
    this.rendered?.dispose();
    this.rendered = null;
    clear(this.content);
    const post = this.host.post;
    if (this.error) {
      this.content.appendChild(errorView(this.error, { store: this.store, post, columns: this.columns, options: this.options }));
      return;
    }
    if (!this.report) {
      this.content.appendChild(element('p', { className: 'app-waiting', text: 'Waiting for the analysis…' }));
      return;
    }
    const stem = fileStem(this.fileName || this.report.source.name);
    const comparison = this.comparison ? renderComparison(this.comparison, { store: this.store, post, fileStem: stem }) : null;
    if (comparison) this.content.appendChild(comparison.element);
    const rendered = renderReport(this.report, {
      store: this.store,
      post,
      fileStem: stem,
      columns: this.columns,
      options: this.options ?? { ...this.report.options, label: this.report.label, features: this.report.features },
      packedSample: this.packedSample,
    });
    this.rendered = comparison ? { element: rendered.element, dispose: () => {
      comparison.dispose();
      rendered.dispose();
    } } : rendered;
    this.content.appendChild(this.rendered.element);
  }

  private drawHeader(): void {
    const name = this.fileName || this.report?.source.name || '';
    const post = this.host.post;
    clear(this.header);
    this.header.append(
      element('h1', { className: 'file-name', text: name || 'Scatterwise' }),
      element('div', { className: 'header-actions' }, [
        button('Generate fit script', () => post({ type: 'command', command: 'generateScript' }), { attributes: { disabled: !this.report || this.error !== null } }),
        button('Compare with HEAD', () => post({ type: 'command', command: 'compareWithHead' }), { attributes: { disabled: !this.report || this.error !== null } }),
      ]),
    );
    if (this.settings && this.report && this.settings.plotBudget !== this.report.options.plotBudget) {
      this.header.appendChild(
        element('p', { className: 'note', text: `The plot budget setting is now ${this.settings.plotBudget.toLocaleString('en-US')} points; this report was sampled with ${this.report.options.plotBudget.toLocaleString('en-US')}. Refit to apply it.` }),
      );
    }
  }

  private showProgress(message: ProgressMessage | null): void {
    clear(this.status);
    if (message) this.status.appendChild(progressStrip(message, this.host.post));
  }
}
