/** The five screens of the main area, one per file; their figures come from the pure builders in ../figures/. */
export { FitScreen } from './FitScreen.tsx';
export { PosteriorScreen } from './PosteriorScreen.tsx';
export { PriorScreen } from './PriorScreen.tsx';
export { ProblemScreen } from './ProblemScreen.tsx';
export { RealisationsScreen } from './RealisationsScreen.tsx';
export { VolumeScreen } from './VolumeScreen.tsx';
