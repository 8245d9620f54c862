// Every number in the panel explains itself: each key figure, effect size, secondary statistic, estimate,
// assumption and notice of the demo results has an explanation (what it is, how to read it, a source), and the
// markdown hover finds the same text for the terms a report block writes.
import { strict as assert } from 'node:assert';
import { readdirSync } from 'node:fs';
import { join } from 'node:path';
import { EXPLANATIONS, explanationAt, explain } from '../../../src/report/explanations';
import { buildPanelPayload } from '../../../src/report/panel';
import { demoFolder, demoResult } from './demoResults';

const options = { id: 'r', title: 't', sourceDescription: '', decimals: 2, canSave: false, canRerun: false };

describe('explanations', () => {
  it('each explanation says what it is, how to read it, and a formula or source', () => {
    for (const [key, e] of Object.entries(EXPLANATIONS)) {
      assert.ok(e.term.length > 0 && e.what.length > 15 && e.read.length > 15 && e.source.length > 0, key);
    }
  });

  const files = [...readdirSync(demoFolder).filter((f) => f.endsWith('.countercheck.json')), ...readdirSync(join(demoFolder, 'advanced')).filter((f) => f.endsWith('.countercheck.json')).map((f) => `advanced/${f}`)];
  for (const file of files) {
    it(`${file}: every figure, statistic, estimate, assumption and warning in the panel has its explanation`, async () => {
      const { result } = await demoResult(file);
      const payload = buildPanelPayload(result, options);
      const missing = [
        ...payload.keyFigures.filter((k) => !k.explain && !/^\d+(\.\d+)?% /.test(k.label)).map((k) => `figure ${k.label}`),
        ...payload.otherStatistics.filter((o) => !o.explain).map((o) => `statistic ${o.name}`),
        ...payload.assumptions.filter((a) => !a.explain).map((a) => `assumption ${a.id}`),
        ...payload.notices.filter((n) => n.severity === 'warning' && !n.explain).map((n) => `warning ${n.message.slice(0, 40)}`),
        ...(payload.keyEstimate && !payload.keyEstimate.explain ? [`key estimate ${payload.keyEstimate.label}`] : []),
      ];
      assert.deepEqual(missing, []);
    });
  }

  it('the markdown hover finds terms in a result line, longest first, symbols only on their own', () => {
    const line = "χ²(4, N = 39) = 11.90, exact p = .026; Cramér's V = 0.391, adjusted residual +2.53";
    assert.equal(explanationAt(line, 2)?.explanation, explain('χ²'));
    assert.equal(explanationAt(line, line.indexOf('Cramér') + 3)?.explanation.term, "Cramér's V");
    assert.equal(explanationAt(line, line.indexOf('adjusted') + 2)?.explanation.term, 'Adjusted residual');
    assert.equal(explanationAt(line, line.indexOf('exact p') + 1)?.explanation.term, 'Exact p-value');
    assert.equal(explanationAt('AX²B', 1), undefined, 'not inside a word');
    assert.equal(explanationAt('nothing to see', 3), undefined);
  });
});
