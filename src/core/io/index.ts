/**
 * The file formats, one flat index (pure: no node:fs; the browser and the command line share them).
 */
export { FileFormatError, MAX_FILE_BYTES, type FileLocation, type FileWarning } from './errors.ts';
export { parseJsonText, locateJsonError } from './json.ts';
export {
  parseProblemFile,
  writeProblemFile,
  problemToJson,
  encodeOperatorFile,
  PROBLEM_KIND,
  PROBLEM_VERSION,
  MAX_CELLS,
  type ReadSibling,
  type ProblemFileResult,
  type OperatorPlacement,
} from './problemFile.ts';
export {
  parsePriorFile,
  writePriorFile,
  priorToJson,
  checkPriorForGrid,
  PRIOR_KIND,
  PRIOR_VERSION,
  type PriorFileResult,
} from './priorFile.ts';
export { parseCsv, csvColumns, writeCsv, type CsvTable, type CsvOptions } from './csv.ts';
export { parseMatrixMarket, writeMatrixMarket, writeMatrixMarketArray, writeMatrixMarketCoordinate } from './matrixMarket.ts';
export { parseNpy, npyToMatrix, writeNpy, writeNpyMatrix, type NpyArray } from './npy.ts';
