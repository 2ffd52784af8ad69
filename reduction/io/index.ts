/**
 * Model input and output. Text parsers (usable on uploaded buffers) and the file loader used by the
 * command line; every path ends in `assembleModel`, the single validation boundary.
 */
export { assembleModel, type ModelMatrices, type ModelDescription } from './assemble';
export { parseCsvMatrix } from './csv';
export { parseMatrixMarket, writeMatrixMarket } from './matrix-market';
export { parseModelJson, modelToJson, matrixFromJsonRows } from './json';
export { loadModelFiles } from './files';
export { parseModelFiles, parseMatrixFile, type ModelFileText } from './model-files';
export { secondOrderToFirstOrder, splitSecondOrderOutput, type SecondOrderMatrices } from '../second-order';
export { DEFAULT_MAX_DENSE_ENTRIES, MAX_DENSE_ENTRIES_ENV, maxDenseEntries, type ReadLimits } from './limits';
