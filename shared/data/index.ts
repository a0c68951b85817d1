export * from './csv';
export * from './types';
