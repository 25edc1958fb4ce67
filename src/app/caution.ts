/**
 * The caution shown in the footer at all times and printed in the report (./session/actions.ts).
 * Its own module, importing nothing, so the report code need not import the App shell.
 */
export const CAUTION =
  'Results depend on the forward model, the data errors and the chosen prior. Where they inform decisions about ' +
  'safety, resources or regulated matters, they need review by a qualified professional under local codes and practice.';
