/** The output resistance of a single output device (`out` alone at the output): ro of `out`.
 *  Shared by the simple mirror and the references' taps, which are simple-mirror copies, and in
 *  its bipolar form by the simple and beta-helper mirrors and the bipolar references' taps
 *  (ro = VA/IC there, written ro_out). */
import { ro, type KindSpec } from './kind';

export const singleRout: KindSpec['rout'] = {
  formula: '1/gds_out',
  value: ({ out }) => ro(out),
};

export const bipolarSingleRout: KindSpec['rout'] = {
  formula: 'ro_out',
  value: ({ out }) => ro(out),
};
