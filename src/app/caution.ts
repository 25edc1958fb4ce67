/** The caution of the footer and the report; defined beside the report builder (src/core/report/caution.ts), a leaf module. */
export { CAUTION } from '../core/report/caution.ts';
