// src/errors.ts as a chunk sees it (dist/xlsx.js, dist/parquet.js): the module of the bundle that loaded the chunk,
// registered by src/data/lazy.ts before the chunk is required, so both throw and recognise the same InputError class.
const shared = globalThis[Symbol.for('countercheck.errors')];
if (!shared) throw new Error('a reader chunk was required without src/data/lazy.ts, which shares the error classes first');
module.exports = shared;
