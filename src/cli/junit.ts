/**
 * JUnit XML for `check --junit`: one <testsuite> holding one <testcase> per saved test, in the shape CI
 * servers read (a <failure> for a change that fails the check, an <error> for a test that cannot run,
 * <system-out> with the comparison for the rest). Pure: text out.
 */
export interface JunitCase {
  /** The spec file as the user named it. */
  readonly file: string;
  readonly title?: string;
  readonly seconds: number;
  readonly outcome: 'passed' | 'failed' | 'error';
  /** One line for the failure's message attribute. */
  readonly summary: string;
  /** The full comparison (several lines). */
  readonly details: string;
}

export function escapeXml(text: string): string {
  // Characters XML 1.0 cannot carry at all are dropped; the rest are escaped for attributes and text alike.
  // eslint-disable-next-line no-control-regex
  return text.replace(/[\u0000-\u0008\u000b\u000c\u000e-\u001f\ufffe\uffff]/g, '').replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&apos;' })[c]!);
}

export function junitXml(suite: string, cases: readonly JunitCase[], timestamp: Date): string {
  const failures = cases.filter((c) => c.outcome === 'failed').length;
  const errors = cases.filter((c) => c.outcome === 'error').length;
  const total = cases.reduce((s, c) => s + c.seconds, 0);
  const lines = [
    '<?xml version="1.0" encoding="UTF-8"?>',
    `<testsuites name="${escapeXml(suite)}" tests="${cases.length}" failures="${failures}" errors="${errors}" time="${total.toFixed(3)}">`,
    `  <testsuite name="${escapeXml(suite)}" tests="${cases.length}" failures="${failures}" errors="${errors}" skipped="0" time="${total.toFixed(3)}" timestamp="${timestamp.toISOString().replace(/\.\d+Z$/, '')}">`,
  ];
  for (const c of cases) {
    const name = c.title ? `${c.file} (${c.title})` : c.file;
    const open = `    <testcase classname="countercheck" name="${escapeXml(name)}" file="${escapeXml(c.file)}" time="${c.seconds.toFixed(3)}"`;
    if (c.outcome === 'passed') {
      lines.push(`${open}>`, `      <system-out>${escapeXml(c.details)}</system-out>`, '    </testcase>');
    } else {
      const tag = c.outcome === 'failed' ? 'failure' : 'error';
      const type = c.outcome === 'failed' ? 'countercheck.changed' : 'countercheck.cannot-run';
      lines.push(`${open}>`, `      <${tag} message="${escapeXml(c.summary)}" type="${type}">${escapeXml(c.details)}</${tag}>`, '    </testcase>');
    }
  }
  lines.push('  </testsuite>', '</testsuites>', '');
  return lines.join('\n');
}
