/**
 * Tabs after the WAI-ARIA tabs pattern: one tab stop for the tab list (the selected tab), arrow
 * keys, Home and End move between tabs and open them; each panel is focusable and labelled by its tab.
 */
import { element } from '../dom';
import type { TabId } from '../state';

export interface TabDefinition {
  id: TabId;
  label: string;
  content: () => HTMLElement;
}

export interface Tabs {
  element: HTMLElement;
  select: (id: TabId, focus?: boolean) => void;
}

export function tabs(definitions: readonly TabDefinition[], selected: TabId, onSelect: (id: TabId) => void): Tabs {
  const list = element('div', { className: 'tab-list', attributes: { role: 'tablist', 'aria-label': 'Report sections' } });
  const panels = element('div', { className: 'tab-panels' });
  const buttons = new Map<TabId, HTMLButtonElement>();
  const bodies = new Map<TabId, HTMLElement>();
  const built = new Set<TabId>();

  const select = (id: TabId, focus = false): void => {
    for (const definition of definitions) {
      const isSelected = definition.id === id;
      const tab = buttons.get(definition.id) as HTMLButtonElement;
      const body = bodies.get(definition.id) as HTMLElement;
      tab.setAttribute('aria-selected', String(isSelected));
      tab.tabIndex = isSelected ? 0 : -1;
      body.hidden = !isSelected;
      // A tab's content is built the first time it is shown, so hidden plots cost nothing.
      if (isSelected && !built.has(definition.id)) {
        built.add(definition.id);
        body.appendChild(definition.content());
      }
      if (isSelected && focus) tab.focus();
    }
    onSelect(id);
  };

  definitions.forEach((definition, position) => {
    const tab = element('button', {
      className: 'tab',
      text: definition.label,
      attributes: { type: 'button', role: 'tab', id: `tab-${definition.id}`, 'aria-controls': `panel-${definition.id}`, 'data-tab': definition.id },
    });
    tab.addEventListener('click', () => select(definition.id));
    tab.addEventListener('keydown', (event) => {
      const last = definitions.length - 1;
      const target = { ArrowRight: position === last ? 0 : position + 1, ArrowLeft: position === 0 ? last : position - 1, Home: 0, End: last }[event.key];
      if (target === undefined) return;
      event.preventDefault();
      select(definitions[target].id, true);
    });
    buttons.set(definition.id, tab);
    list.appendChild(tab);
    const body = element('div', { className: 'tab-panel', attributes: { role: 'tabpanel', id: `panel-${definition.id}`, 'aria-labelledby': `tab-${definition.id}`, tabindex: 0 } });
    bodies.set(definition.id, body);
    panels.appendChild(body);
  });
  select(definitions.some((d) => d.id === selected) ? selected : definitions[0].id);
  return { element: element('div', { className: 'tabs' }, [list, panels]), select };
}
