'use strict';
// Worker-thread entry for the fast bare PDF part of bench:release (bench-release-bare.ts).
require('tsx/cjs');
require('./bench-release-bare.ts');
