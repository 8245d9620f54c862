// esbuild options shared by the build (scripts/build.mjs) and the notices list (scripts/notices.mjs).
// jsonc-parser's default entry is a UMD build whose internal requires esbuild cannot follow; its ES module
// build bundles cleanly.
export const alias = { 'jsonc-parser': 'jsonc-parser/lib/esm/main.js' };
