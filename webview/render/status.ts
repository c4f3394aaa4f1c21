/** The progress strip (with a cancel button) and the error view. */
import type { ColumnChoice, EditableOptions, ErrorMessage, FromPanel, ProgressMessage } from '../../src/shared/messages';
import { button, element } from '../dom';
import { roleForm } from '../roles';
import type { StateStore } from '../state';

/** The host's phase names in words; any other phase is shown as sent. */
const PHASE_WORDS: Record<string, string> = {
  'first look': 'A first look at the start of the file',
  analysis: 'Reading the whole file',
};

export function progressStrip(message: ProgressMessage, post: (message: FromPanel) => void): HTMLElement {
  const fraction = Math.max(0, Math.min(1, message.fraction));
  const bar = element('progress', { attributes: { max: 100, value: Math.round(fraction * 100), 'aria-label': 'Progress of the analysis' } });
  return element('div', { className: 'progress-strip', attributes: { role: 'status' } }, [
    element('span', { className: 'progress-phase', text: `${PHASE_WORDS[message.phase] ?? message.phase}… ${Math.round(fraction * 100)}%` }),
    bar,
    button('Cancel', () => post({ type: 'command', command: 'cancel' }), { className: 'small-button' }),
  ]);
}

export function errorView(
  message: ErrorMessage,
  context: { store: StateStore; post: (message: FromPanel) => void; columns: readonly ColumnChoice[]; options: EditableOptions | null },
): HTMLElement {
  const children: (HTMLElement | null)[] = [
    element('h2', { className: 'error-title', text: 'The analysis could not run' }),
    element('p', { className: 'error-message', text: message.message }),
    message.hint ? element('p', { className: 'error-hint', text: message.hint }) : null,
    element('p', { className: 'note', text: `Code: ${message.code}` }),
  ];
  const columns = message.columns ?? context.columns;
  const options = message.options ?? context.options;
  if (columns.length > 0 && options) {
    children.push(
      element('h3', { text: 'Change the column roles and fit again' }),
      roleForm({
        columns,
        current: options,
        edits: context.store.value.roleEdits,
        onEdit: (edits) => context.store.update({ roleEdits: edits }),
        onRefit: (chosen) => context.post({ type: 'refit', options: chosen }),
        onSaveRoles: () => context.post({ type: 'command', command: 'saveRoles' }),
      }),
    );
  }
  return element('section', { className: 'error-view', attributes: { role: 'alert' } }, children);
}
