// The planner's figures in US customary units (computeConfiguration with a person's Quantities):
// the same checks and statuses as metric, every converted figure with its unit written out, and
// each number on the safe side of the metric figure by the NIST SP 811 (2008) Appendix B.8 factors
// (from memory): 1 lbf = 4.448 222 N, 1 psi = 6.894 757 kPa, 1 ton (short) = 907.1847 kg, 1 ft = 0.3048 m.
import { describe, expect, it } from 'vitest';
import { computeConfiguration } from '../../../shared/planner/compute';
import { quantitiesIn } from '../../../shared/units/quantity';
import { assistCrane, config, crane, fullKit, withAssist } from '../plan/plan-fixtures';

const inputs = { arrangement: crane, inventory: fullKit(), assistCrane };
const base = config();
const cfg = withAssist({ siteHazards: { ...base.siteHazards, powerLines: [{ label: 'North line', distanceM: 40, voltageKv: 11, voltageConfirmedByOwner: false, encroachmentPreventionInPlace: false, assistDistanceM: null }] } });
const metric = computeConfiguration(cfg, inputs);
const us = computeConfiguration(cfg, inputs, quantitiesIn('us'));
const byKey = (figures: typeof metric.figures) => new Map(figures.map((f) => [f.key, f]));
const m = byKey(metric.figures);
const u = byKey(us.figures);

/** The numbers of a figure's value, thousands separators taken out. */
const numbers = (text: string) => [...text.replace(/(\d),(\d)/g, '$1$2').matchAll(/-?\d+(\.\d+)?/g)].map((x) => Number(x[0]));

describe('planner figures in US customary units', () => {
  it('computes the same checks with the same statuses: only the words change', () => {
    expect([...u.keys()]).toEqual([...m.keys()]);
    for (const [key, f] of m) expect({ key, status: u.get(key)!.status, overridable: u.get(key)!.overridable }).toEqual({ key, status: f.status, overridable: f.overridable });
  });

  it('writes the unit out on loads, capacities, pulls, pressures and wind, with no metric unit left in those values', () => {
    const expected: Record<string, RegExp> = {
      'chart.lift': /US tons of .* US tons at .* ft\)$/,
      'rope.hookBlockRating': /US tons (of|on a) .* US tons/,
      'rope.leadLinePull': /lbf (of|, above the) .* lbf permissible$/,
      'ground.lift': /psi at .* \(allowable .* psi\)/,
      'wind.raising': /^gust ≤ .* mph, mean ≤ .* mph/,
      'site.reach': /ft from the slewing centre$/,
    };
    for (const [key, pattern] of Object.entries(expected)) {
      const value = u.get(key)?.value ?? `(no ${key})`;
      expect(value, key).toMatch(pattern);
      expect(value, key).not.toMatch(/\d (t|kN|kPa|m|m\/s)\b/);
    }
    expect(u.get('assist.lift.0')?.value).toMatch(/US tons of .* US tons at .* ft\)$/);
  });

  it('a pull rounded up never reads below the metric pull, the permissible pull rounded down never above it', () => {
    const [pullKn, permissibleKn] = numbers(m.get('rope.leadLinePull')!.value);
    const [pullLbf, permissibleLbf] = numbers(u.get('rope.leadLinePull')!.value);
    // The metric pull is itself rounded up to 0.1 kN, so the US one may sit up to that 0.1 kN below it, never more.
    expect(pullLbf * 4.448222e-3).toBeGreaterThanOrEqual(pullKn - 0.1 - 1e-6);
    expect(permissibleLbf * 4.448222e-3).toBeLessThanOrEqual(permissibleKn + 1e-6);
  });

  it('a ground pressure rounded up never reads below the metric one; the allowable never above it', () => {
    const [kpa, , allowKpa] = numbers(m.get('ground.lift')!.value);
    const [psi, , allowPsi] = numbers(u.get('ground.lift')!.value);
    expect(psi * 6.894757).toBeGreaterThanOrEqual(kpa - 0.1 - 1e-6);
    expect(allowPsi * 6.894757).toBeLessThanOrEqual(allowKpa + 1e-6);
  });

  it('a lift rounded up and a chart capacity rounded down keep their side in US tons', () => {
    const [, liftT, capacityT] = numbers(m.get('chart.lift')!.value);
    const [, liftUs, capacityUs] = numbers(u.get('chart.lift')!.value);
    expect(liftUs * 0.9071847).toBeGreaterThanOrEqual(liftT - 0.01 - 1e-6);
    expect(capacityUs * 0.9071847).toBeLessThanOrEqual(capacityT + 1e-6);
  });

  it('metric is what the server stores: the default and an explicit metric give the same words', () => {
    expect(computeConfiguration(config(), inputs, quantitiesIn('metric')).figures).toEqual(computeConfiguration(config(), inputs).figures);
  });
});
