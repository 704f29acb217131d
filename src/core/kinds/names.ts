/**
 * The names of the mirror kinds, as pure data: the spec reader, the schema test and the panel's
 * message guard read this list (the webview may import it; it pulls in nothing else). Each
 * template kind is described once in its own file of this folder and registered in `index.ts`,
 * whose table must cover every name here (the compiler checks it).
 */

/** Kinds built from a topology template, in the order the docs and messages list them. */
export const TEMPLATE_KINDS = ['simple', 'cascode', 'wide-swing', 'wilson', 'wilson-balanced', 'beta-helper', 'widlar', 'beta-multiplier', 'vgs-resistor', 'ptat', 'vbe-resistor'] as const;
export type TemplateKind = (typeof TEMPLATE_KINDS)[number];

/** Every value of a mirror's `kind`: the template kinds and `netlist` (the designer's own wiring). */
export const MIRROR_KINDS = [...TEMPLATE_KINDS, 'netlist'] as const;
export type MirrorKind = (typeof MIRROR_KINDS)[number];
