'use strict';

// Stands in for @stdlib/assert-has-generator-support in the browser bundle (next.config.mjs,
// turbopack.resolveAlias). The original tests for generators by compiling code at run time
// (new Function), which the Content-Security-Policy (no 'unsafe-eval') refuses and reports as a
// violation. Answering false makes stdlib's continued fractions and series (the Student t and
// chi-square distribution functions of the Pair explorer) take their plain-loop versions, the
// same algorithms without generators.
module.exports = function hasGeneratorSupport() {
  return false;
};
