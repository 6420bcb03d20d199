export { horizonValues, type HorizonValues } from './horizon-values.js';
export { infiniteValues, DENSE_SOLVE_LIMIT, type InfiniteValuesOptions } from './infinite-values.js';
export { exactEvaluation, type ExactResult, type ExactOptions } from './evaluate.js';
export { returnBounds, moduleReturnBounds } from './return-bounds.js';
export { expectedReturn } from './expected-return.js';
