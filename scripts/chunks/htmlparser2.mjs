// htmlparser2's Parser as its own bundle (dist/htmlparser2.js), for src/data/html.ts; see scripts/build.mjs.
export { Parser } from 'htmlparser2';
