'use strict';
// Entry of a PDF rendering thread (lib/pdf/pool.ts): TypeScript is loaded through tsx, which the
// seeders use the same way, so the thread runs the very same lib/pdf code as the app.
require('tsx/cjs');
require('./render-worker.ts');
