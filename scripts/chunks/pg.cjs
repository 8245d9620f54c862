// The PostgreSQL client as its own bundle (dist/pg.js); see scripts/build.mjs.
module.exports = require('pg');
