/** The ideal current source's stamp: a constant current, no Jacobian entries. `alpha` scales it
 *  (source stepping). */
import type { Workspace } from '../workspace';
import type { CurrentSourceElement } from './element';

export function loadCurrentSource(src: CurrentSourceElement, ws: Workspace, alpha: number): void {
  const { F, absI } = ws;
  const i = alpha * src.i;
  F[src.from] = F[src.from]! + i; F[src.to] = F[src.to]! - i;
  const ai = Math.abs(i);
  absI[src.from] = absI[src.from]! + ai; absI[src.to] = absI[src.to]! + ai;
}
