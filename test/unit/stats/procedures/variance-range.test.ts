// Values or a σ0 whose squares leave the double range end in a clear error at the field to change, never in a
// result with statistic and p null, "s = NaN" or a "[∞, ∞)" bound.
import { strict as assert } from 'node:assert';
import { InputError, isInstance } from '../../../../src/errors';
import { varianceTestFromValues } from '../../../../src/stats/procedures/variance';
import { argumentNamed } from '../argument';

function refused(run: () => unknown, argument: string, message: RegExp): void {
  assert.throws(run, (e: unknown) => {
    assert.ok(isInstance(e, InputError), `expected an InputError, got ${String(e)}`);
    assert.equal(e.code, 'out-of-range');
    assert.equal(argumentNamed(e), argument);
    assert.match(e.message, message);
    return true;
  });
}

describe('variance test at the edges of the double range', () => {
  it('refuses values whose squared deviations overflow ([1e308, −1e308, 1e308])', () => {
    refused(() => varianceTestFromValues([1e308, -1e308, 1e308], { sigma0: 1 }), 'values', /smaller units/);
  });
  it('refuses sigma0 = 1e-160, whose square leaves the range of normal doubles', () => {
    refused(() => varianceTestFromValues([1, 2, 3, 4], { sigma0: 1e-160 }), 'sigma0', /sigma0/);
  });
  it('refuses a statistic that overflows although both squares are finite', () => {
    refused(() => varianceTestFromValues([0, 1e150, 2e150], { variance0: 1e-20 }), 'variance0', /statistic/);
  });
  it('still tests values near 1e150 against a sigma0 of the same size (no false refusal)', () => {
    const r = varianceTestFromValues([1e150, 2e150, 4e150, 3e150], { sigma0: 1e150 });
    // Σ(x − x̄)² = 5e300 (x̄ = 2.5e150: 2.25 + 0.25 + 2.25 + 0.25 = 5, times 1e300), so X² = 5 exactly.
    assert.ok(Math.abs(r.statistic - 5) < 1e-12, String(r.statistic));
    assert.ok(Number.isFinite(r.pValue.value));
  });
});
