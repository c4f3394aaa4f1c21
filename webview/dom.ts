/**
 * Small DOM builders. Every string that may come from the data (column names, labels, file names)
 * goes in as text (textContent / setAttribute), never as markup: nothing here parses HTML.
 */
export type Child = Node | string | null | undefined | false;

export interface ElementOptions {
  className?: string;
  text?: string;
  attributes?: Record<string, string | number | boolean | undefined>;
}

/** Creates an element with a class, text and attributes, and appends the children (strings as text nodes). */
export function element<K extends keyof HTMLElementTagNameMap>(
  tag: K,
  options: ElementOptions = {},
  children: readonly Child[] = [],
): HTMLElementTagNameMap[K] {
  const node = document.createElement(tag);
  if (options.className) node.className = options.className;
  if (options.text !== undefined) node.textContent = options.text;
  setAttributes(node, options.attributes);
  append(node, children);
  return node;
}

const SVG_NAMESPACE = 'http://www.w3.org/2000/svg';

/** Creates an SVG element (presentation attributes such as `fill` are attributes, not inline styles). */
export function svgElement<K extends keyof SVGElementTagNameMap>(
  tag: K,
  attributes: Record<string, string | number | undefined> = {},
  children: readonly Child[] = [],
): SVGElementTagNameMap[K] {
  const node = document.createElementNS(SVG_NAMESPACE, tag);
  setAttributes(node, attributes);
  append(node, children);
  return node;
}

function setAttributes(node: Element, attributes: Record<string, string | number | boolean | undefined> | undefined): void {
  if (!attributes) return;
  for (const [name, value] of Object.entries(attributes)) {
    if (value === undefined || value === false) continue;
    node.setAttribute(name, value === true ? '' : String(value));
  }
}

export function append(parent: Node, children: readonly Child[]): void {
  for (const child of children) {
    if (child === null || child === undefined || child === false) continue;
    parent.appendChild(typeof child === 'string' ? document.createTextNode(child) : child);
  }
}

/** Removes every child of a node. */
export function clear(node: Node): void {
  while (node.firstChild) node.removeChild(node.firstChild);
}

/** A button that runs `action` on click (Enter and Space come with the element). */
export function button(label: string, action: () => void, options: ElementOptions = {}): HTMLButtonElement {
  const node = element('button', { ...options, text: label, attributes: { type: 'button', ...options.attributes } });
  node.addEventListener('click', action);
  return node;
}

/** A heading followed by content, as a labelled section. */
export function section(id: string, title: string, children: readonly Child[], className = 'section'): HTMLElement {
  const heading = element('h3', { className: 'section-title', text: title, attributes: { id: `${id}-title` } });
  return element('section', { className, attributes: { 'aria-labelledby': `${id}-title` } }, [heading, ...children]);
}

let uniqueCounter = 0;
/** An id unique within the page, for label/aria wiring. */
export function uniqueId(prefix: string): string {
  uniqueCounter += 1;
  return `${prefix}-${uniqueCounter}`;
}
