/** Every cell function, for the hosts (each file is listed in ./sources.js for the metadata). */
export * from './functions';
export * from './fitting';
export * from './fitModel';
export * from './ternary';
export * from './uncertainty';
export * from './extraction';
