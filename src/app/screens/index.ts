/** The screens of the main area (a 3-D grid has the volume screen, a cell list the cells screen), one per file; their figures come from the pure builders in ../figures/. */
export { CellsScreen } from './CellsScreen.tsx';
export { FitScreen } from './FitScreen.tsx';
export { PosteriorScreen } from './PosteriorScreen.tsx';
export { PriorScreen } from './PriorScreen.tsx';
export { ProblemScreen } from './ProblemScreen.tsx';
export { RealisationsScreen } from './RealisationsScreen.tsx';
export { VolumeScreen } from './VolumeScreen.tsx';
