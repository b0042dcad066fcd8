// Entry of each mesh worker thread (piscina loads it with require): the
// sources are TypeScript, so tsx's loader is registered in the thread first.
require('tsx/cjs/api').register();
module.exports = require('./worker.ts');
