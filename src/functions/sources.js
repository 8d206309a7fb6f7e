// The files whose JSDoc @customfunction tags make functions.json, in the order their functions
// appear there. Read by webpack.config.js (metadata plugin input) and by the tests; index.ts
// re-exports every one of them for the hosts.
module.exports = ['functions.ts', 'fitting.ts', 'fitModel.ts', 'ternary.ts', 'extraction.ts', 'uncertainty.ts'];
