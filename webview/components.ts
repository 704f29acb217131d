/**
 * The panel's component layer: every UI element the panel uses is made here, so the rest of the
 * page never touches a widget library. Buttons and dividers come from @vscode/webview-ui-toolkit
 * (its repository is archived; swapping it means editing only this file). Badges and tags are
 * our own spans: the toolkit's badge template (which its tag reuses) sets an inline `style`
 * attribute, and the panel's CSP has no 'unsafe-inline' to allow it. Tables are plain semantic <table>s: numbers need right-aligned tabular columns, <th>
 * headers with units and a caption for screen readers, and rows that act on Enter — the
 * toolkit's data grid renders cells in shadow DOM with fixed-width text cells and handles
 * keys per cell, which serves prose lists better than columns of figures.
 */
import { provideVSCodeDesignSystem, vsCodeButton, vsCodeDivider } from '@vscode/webview-ui-toolkit';

let registered = false;

/** Define the custom elements once per page. */
export function registerComponents(): void {
  if (registered) return;
  registered = true;
  provideVSCodeDesignSystem().register(vsCodeButton(), vsCodeDivider());
}

type Child = Node | string | undefined | null | false;
type Attrs = Record<string, string | number | boolean | undefined>;

/** A DOM element with attributes (false/undefined omitted, true as an empty attribute). */
export function h<K extends keyof HTMLElementTagNameMap>(tag: K, attrs: Attrs = {}, ...children: Child[]): HTMLElementTagNameMap[K] {
  const el = document.createElement(tag);
  setAttributes(el, attrs);
  append(el, children);
  return el;
}

function custom(tag: string, attrs: Attrs, ...children: Child[]): HTMLElement {
  const el = document.createElement(tag);
  setAttributes(el, attrs);
  append(el, children);
  return el;
}

function setAttributes(el: Element, attrs: Attrs): void {
  for (const [k, v] of Object.entries(attrs)) {
    if (v === undefined || v === false) continue;
    el.setAttribute(k, v === true ? '' : String(v));
  }
}

function append(el: Element, children: Child[]): void {
  for (const c of children) {
    if (c === undefined || c === null || c === false) continue;
    el.append(typeof c === 'string' ? document.createTextNode(c) : c);
  }
}

/** A count in a pill (findings per severity). */
export function badge(text: string, attrs: Attrs = {}): HTMLElement {
  return h('span', { ...attrs, class: ['badge', attrs.class].filter(Boolean).join(' ') }, text);
}

/** A short label (mirror kind, polarity, "sized"). */
export function tag(text: string, attrs: Attrs = {}): HTMLElement {
  return h('span', { ...attrs, class: ['tag', attrs.class].filter(Boolean).join(' ') }, text);
}

export function button(text: string, onClick: () => void, attrs: Attrs = {}): HTMLElement {
  const el = custom('vscode-button', attrs, text);
  el.addEventListener('click', onClick);
  return el;
}

export function divider(): HTMLElement {
  return custom('vscode-divider', { role: 'separator' });
}

/** A titled section; `id` names it for tests and for aria-labelledby. */
export function section(id: string, title: string | Node, ...children: Child[]): HTMLElement {
  const headingId = `${id}-title`;
  return h('section', { id, class: 'section', 'aria-labelledby': headingId },
    h('h3', { id: headingId }, title), ...children);
}

/** Severity as a coloured word (colour from the theme's error/warning/info foregrounds). */
export function severityLabel(severity: string): HTMLElement {
  return h('span', { class: `severity severity-${severity}` }, severity);
}

export interface TableColumn { label: string; numeric: boolean; title?: string }
export interface TableCell { text: string | Node; title?: string; className?: string }
export interface TableRow {
  cells: TableCell[];
  className?: string;
  /** Accessible name for the row's action ("Reveal device out"). */
  actionLabel?: string;
  /** Click, Enter or Space on the row runs it; rows with an action are in the tab order. */
  onActivate?: () => void;
  /** Marks the row for focus restoring across re-renders. */
  key?: string;
  selected?: boolean;
  /** A heading row over the rows that follow (a group), spanning every column; `cells` unused. */
  group?: string;
}

export function table(caption: string, columns: readonly TableColumn[], rows: readonly TableRow[], attrs: Attrs = {}): HTMLTableElement {
  const head = h('thead', {}, h('tr', {}, ...columns.map((c) =>
    h('th', { scope: 'col', class: c.numeric ? 'num' : undefined, title: c.title }, c.label))));
  const body = h('tbody', {}, ...rows.map((r) => tableRow(columns, r)));
  return h('table', { class: 'grid', ...attrs }, h('caption', { class: 'visually-hidden' }, caption), head, body);
}

function tableRow(columns: readonly TableColumn[], row: TableRow): HTMLTableRowElement {
  if (row.group !== undefined) {
    return h('tr', { class: 'group', 'data-key': row.key }, h('th', { scope: 'colgroup', colspan: columns.length }, row.group));
  }
  const tr = h('tr', {
    class: [row.className, row.onActivate ? 'action' : undefined, row.selected ? 'selected' : undefined].filter(Boolean).join(' ') || undefined,
    tabindex: row.onActivate ? 0 : undefined,
    'aria-label': row.actionLabel,
    'aria-selected': row.selected === undefined ? undefined : String(row.selected),
    'data-key': row.key,
  }, ...row.cells.map((c, i) => {
    const col = columns[i];
    const cls = [col?.numeric ? 'num' : undefined, c.className].filter(Boolean).join(' ') || undefined;
    return i === 0 ? h('th', { scope: 'row', class: cls, title: c.title }, c.text) : h('td', { class: cls, title: c.title }, c.text);
  }));
  const act = row.onActivate;
  if (act) {
    tr.addEventListener('click', () => act());
    tr.addEventListener('keydown', (e) => {
      if (e.key === 'Enter' || e.key === ' ') {
        e.preventDefault();
        act();
      }
    });
  }
  return tr;
}

/** A definition grid of labelled figures: label, value, and an optional detail line. */
export function figures(items: readonly { key: string; label: string; value: string; detail?: string }[], attrs: Attrs = {}): HTMLElement {
  return h('dl', { ...attrs, class: 'figures' }, ...items.map((f) =>
    h('div', { class: 'figure', 'data-figure': f.key },
      h('dt', {}, f.label),
      h('dd', {}, h('span', { class: 'value' }, f.value), f.detail ? h('span', { class: 'detail' }, f.detail) : undefined))));
}
