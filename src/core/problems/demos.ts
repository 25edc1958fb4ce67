/** STUB — replaced by the problems/ owner. Signatures are the contract. */
import type { PriorSpec } from '../prior/spec.ts';
import type { Problem } from './spec.ts';

export interface DemoProblem {
  /** Stable id used in URLs and the CLI: "borehole-log", "crosshole-tomography", "potential-field". */
  readonly id: string;
  readonly title: string;
  /** One or two sentences describing the invented scenario. */
  readonly description: string;
  /** Deterministic (seeded) construction. */
  build(): { problem: Problem; truthPrior: PriorSpec; startPrior: PriorSpec };
}

export const DEMOS: readonly DemoProblem[] = [];
