export * from './convergence';
export * from './summary';
export * from './verdict';
export { autocovariance } from './autocovariance';
