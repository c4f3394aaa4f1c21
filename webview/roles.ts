/**
 * The column roles form: which column is the label, which columns are features, and the fit
 * options a user may change here (missing values, solver, priors, cross-validation). "Refit" posts
 * the options to the host; every edit is kept in the panel state until then.
 */
import { MISSING_POLICIES, PRIORS, SOLVERS, type CvMethod } from '../src/core/types';
import type { ColumnChoice, EditableOptions } from '../src/shared/messages';
import { button, element, uniqueId } from './dom';
import { formatCount } from './format';

export interface RoleFormOptions {
  columns: readonly ColumnChoice[];
  /** The options of the shown result (or of the failed run). */
  current: EditableOptions;
  /** Edits made earlier and not yet refitted. */
  edits: EditableOptions | null;
  /** Called with the edited options, or null when the edits are undone. */
  onEdit: (options: EditableOptions | null) => void;
  onRefit: (options: EditableOptions) => void;
  onSaveRoles: () => void;
}

const DESCRIPTIONS: Record<string, string> = {
  'drop-rows': 'drop rows with a missing value',
  'drop-columns': 'drop columns with a missing value',
  auto: 'auto',
  exact: 'exact',
  shrinkage: 'shrinkage (Ledoit–Wolf)',
  empirical: 'empirical (class shares)',
  uniform: 'uniform',
};

function labelled(text: string, control: HTMLElement, hint?: string): HTMLElement {
  const id = uniqueId('role');
  control.id = id;
  return element('div', { className: 'form-field' }, [element('label', { text, attributes: { for: id } }), control, hint ? element('span', { className: 'field-hint', text: hint }) : null]);
}

function select(values: readonly string[], chosen: string, describe: (v: string) => string = (v) => DESCRIPTIONS[v] ?? v): HTMLSelectElement {
  return element(
    'select',
    {},
    values.map((value) => element('option', { text: describe(value), attributes: { value, selected: value === chosen } })),
  );
}

function columnDescription(column: ColumnChoice): string {
  return `${column.name} (${column.kind}, ${formatCount(column.distinct)}${column.distinct >= 1000 ? '+' : ''} distinct)`;
}

/** The label and features a form starts with: the edits if they still fit the columns, else the current options. */
function startingOptions(columns: readonly ColumnChoice[], current: EditableOptions, edits: EditableOptions | null): EditableOptions {
  const names = new Set(columns.map((c) => c.name));
  const fits = edits && (!edits.label || names.has(edits.label)) && (edits.features ?? []).every((f) => names.has(f));
  return fits && edits ? edits : current;
}

export function roleForm(options: RoleFormOptions): HTMLFormElement {
  const { columns } = options;
  const start = startingOptions(columns, options.current, options.edits);
  const labelCandidates = columns.filter((c) => c.kind === 'text' || c.kind === 'numeric');
  const labelSelect = select(
    labelCandidates.map((c) => c.name),
    start.label ?? '',
    (name) => columnDescription(labelCandidates.find((c) => c.name === name) as ColumnChoice),
  );
  if (!start.label) labelSelect.insertBefore(element('option', { text: '(detect automatically)', attributes: { value: '', selected: true } }), labelSelect.firstChild);

  const numeric = columns.filter((c) => c.kind === 'numeric');
  const excluded = new Set(start.exclude ?? []);
  const ticked = new Set(start.features ?? numeric.map((c) => c.name).filter((n) => n !== start.label && !excluded.has(n)));
  const featureBoxes = numeric.map((column) => {
    const box = element('input', { attributes: { type: 'checkbox', value: column.name, checked: ticked.has(column.name) } });
    const item = element('label', { className: 'feature-choice' }, [box, ` ${column.name}`]);
    return { column, box, item };
  });
  const featureList = element('fieldset', { className: 'feature-choices' }, [element('legend', { text: 'Features' }), ...featureBoxes.map((f) => f.item)]);

  const missing = select(MISSING_POLICIES, start.missing);
  const solver = select(SOLVERS, start.solver);
  const priors = select(PRIORS, start.priors);
  const folds = /^kfold:(\d+)$/.exec(start.cv);
  const cvKind = select(['auto', 'none', 'loo', 'kfold'], folds ? 'kfold' : start.cv, (v) => ({ auto: 'auto', none: 'none', loo: 'leave-one-out', kfold: 'stratified k-fold' })[v] ?? v);
  const foldCount = element('input', { attributes: { type: 'number', min: 2, max: 100, step: 1, value: folds ? folds[1] : '10' } });
  const problem = element('p', { className: 'form-problem', attributes: { role: 'status', 'aria-live': 'polite' } });

  const read = (): EditableOptions => {
    const label = labelSelect.value || undefined;
    const features = featureBoxes.filter((f) => f.box.checked && f.column.name !== label).map((f) => f.column.name);
    const cv: CvMethod = cvKind.value === 'kfold' ? `kfold:${Math.round(Number(foldCount.value))}` : (cvKind.value as CvMethod);
    return { label, features, solver: solver.value as EditableOptions['solver'], priors: priors.value as EditableOptions['priors'], cv, missing: missing.value as EditableOptions['missing'] };
  };
  const refitButton = button('Refit', () => {
    if (check()) options.onRefit(read());
  }, { className: 'primary-button' });
  const check = (): boolean => {
    const chosen = read();
    const label = chosen.label;
    for (const f of featureBoxes) f.box.disabled = f.column.name === label;
    foldCount.disabled = cvKind.value !== 'kfold';
    let message = '';
    if ((chosen.features ?? []).length === 0) message = 'Tick at least one feature.';
    else if (cvKind.value === 'kfold' && !(Number.isInteger(Number(foldCount.value)) && Number(foldCount.value) >= 2)) message = 'The number of folds must be a whole number of at least 2.';
    problem.textContent = message;
    refitButton.disabled = message !== '';
    return message === '';
  };
  const changed = (): void => {
    check();
    options.onEdit(read());
  };

  const form = element('form', { className: 'role-form', attributes: { 'aria-label': 'Column roles and fit options' } }, [
    labelled('Label column', labelSelect),
    featureList,
    element('div', { className: 'control-row' }, [
      button('Tick all', () => {
        for (const f of featureBoxes) f.box.checked = true;
        changed();
      }, { className: 'small-button' }),
      button('Untick all', () => {
        for (const f of featureBoxes) f.box.checked = false;
        changed();
      }, { className: 'small-button' }),
    ]),
    element('div', { className: 'form-grid' }, [
      labelled('Missing values', missing),
      labelled('Solver', solver),
      labelled('Priors', priors),
      labelled('Cross-validation', cvKind),
      labelled('Folds', foldCount, 'for k-fold'),
    ]),
    problem,
    element('div', { className: 'control-row' }, [refitButton, button('Save roles', options.onSaveRoles), button('Undo edits', () => {
      options.onEdit(null);
      form.replaceWith(roleForm({ ...options, edits: null }));
    })]),
  ]);
  form.addEventListener('change', changed);
  form.addEventListener('submit', (event) => {
    event.preventDefault();
    if (check()) options.onRefit(read());
  });
  check();
  return form;
}
