// `npm run package`: builds the .vsix with vsce and fails when vsce prints a warning (a missing field, a file
// that should not ship), so the package stays marketplace-ready. Arguments are passed on to `vsce package`.
import { spawnSync } from 'node:child_process';

const r = spawnSync('npx', ['vsce', 'package', ...process.argv.slice(2)], { encoding: 'utf8' });
process.stdout.write(r.stdout.split('\n').filter((l) => !/^[│├└]|^ {3}/.test(l)).join('\n'));
process.stderr.write(r.stderr);
const warnings = `${r.stdout}\n${r.stderr}`.split('\n').filter((l) => /\bWARNING\b/.test(l));
if (r.status !== 0) process.exit(r.status ?? 1);
if (warnings.length > 0) {
  console.error(`vsce printed ${warnings.length} warning(s); the package must build without any`);
  process.exit(1);
}
