/**
 * The caution shown in the workbench's footer at all times and printed in every report (browser
 * and command line). A leaf module: it imports nothing.
 */
export const CAUTION =
  'Results depend on the forward model, the data errors and the chosen prior. Where they inform decisions about ' +
  'safety, resources or regulated matters, they need review by a qualified professional under local codes and practice.';
