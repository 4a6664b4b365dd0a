import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { unit } from 'mathjs';
import {
  SHEAVE_EFFICIENCY_PRESETS,
  leadLinePull,
  leadLinePullBySheave,
  reevedSheaveEfficiencies,
  requiredParts,
  requiredPartsBySheave,
} from '../../../shared/calc';
import { expectCalcError, relErr } from '../helpers';

const lbfToKn = (lbf: number) => unit(lbf, 'lbf').toNumber('kN');

describe('leadLinePull', () => {
  it('Pipeline Rules of Thumb Handbook, block-and-tackle example: 4 parts, E = 91.7 % → MA 3.25, 3,250 lb needs about 1,000 lb', () => {
    const r = leadLinePull({ loadKn: lbfToKn(3250), parts: 4, sheaveEfficiency: 0.917, extraLeadSheaves: 0 });
    // The handbook rounds MA to 3.25; the closed form gives 3.236.
    expect(r.mechanicalAdvantage).toBeCloseTo(3.25, 1);
    expect(relErr(r.leadLinePullKn, lbfToKn(1000))).toBeLessThan(0.005);
    expect(r.rule).toMatch(/E\(1−Eⁿ\)\/\(1−E\)/);
  });

  it('Wire Rope Users Manual 4th ed.: plain bearings, 4 parts → lead-line factor 0.309', () => {
    const r = leadLinePull({ loadKn: 1, parts: 4, sheaveEfficiency: 1 / 1.09, extraLeadSheaves: 0 });
    expect(r.leadLinePullKn).toBeCloseTo(0.309, 3);
  });

  it('Wire Rope Users Manual 4th ed. example: 4 parts, plain bearings, two extra lead sheaves, 6,000 lb → 2,202 lb (0.309 × 1.09 × 1.09)', () => {
    const exact = leadLinePull({ loadKn: lbfToKn(6000), parts: 4, sheaveEfficiency: 1 / 1.09, extraLeadSheaves: 2 });
    expect(relErr(exact.leadLinePullKn, lbfToKn(2202))).toBeLessThan(0.001);
    // The rounded preset (91.7 %) lands within 0.2 % of the same published answer.
    const preset = leadLinePull({
      loadKn: lbfToKn(6000),
      parts: 4,
      sheaveEfficiency: SHEAVE_EFFICIENCY_PRESETS.plainBearing.efficiency,
      extraLeadSheaves: 2,
    });
    expect(relErr(preset.leadLinePullKn, lbfToKn(2202))).toBeLessThan(0.002);
  });

  it('Wire Rope Users Manual 4th ed., static case: 6,000 lb on 4 parts without friction → 1,500 lb (MA = n when E = 1)', () => {
    const r = leadLinePull({ loadKn: lbfToKn(6000), parts: 4, sheaveEfficiency: 1, extraLeadSheaves: 0 });
    expect(r.mechanicalAdvantage).toBe(4);
    expect(relErr(r.leadLinePullKn, lbfToKn(1500))).toBeLessThan(1e-12);
  });

  it('refuses zero parts, fractional parts, efficiency 0 or above 1, negative load', () => {
    const ok = { loadKn: 100, parts: 4, sheaveEfficiency: 0.96, extraLeadSheaves: 0 };
    expectCalcError(() => leadLinePull({ ...ok, parts: 0 }), 'parts');
    expectCalcError(() => leadLinePull({ ...ok, parts: 2.5 }), 'parts');
    expectCalcError(() => leadLinePull({ ...ok, sheaveEfficiency: 0 }), 'sheaveEfficiency');
    expectCalcError(() => leadLinePull({ ...ok, sheaveEfficiency: 1.01 }), 'sheaveEfficiency');
    expectCalcError(() => leadLinePull({ ...ok, loadKn: -1 }), 'loadKn');
    expectCalcError(() => leadLinePull({ ...ok, extraLeadSheaves: -1 }), 'extraLeadSheaves');
  });
});

describe('sheave efficiency presets', () => {
  // Two publications, checked against each other rather than against the constant typed again:
  // the Wire Rope Users Manual 4th ed. p. 88 gives a factor of 1.09 per plain-bearing sheave and 1.04 per anti-friction sheave.
  it('plain bearing preset (Pipeline Rules of Thumb Handbook, 91.7 %) agrees with 1/1.09 (Wire Rope Users Manual 4th ed. p. 88) to 0.05 %', () => {
    expect(relErr(SHEAVE_EFFICIENCY_PRESETS.plainBearing.efficiency, 1 / 1.09)).toBeLessThan(5e-4);
    expect(SHEAVE_EFFICIENCY_PRESETS.plainBearing.source).toMatch(/Pipeline Rules of Thumb/);
  });
  it('rolling bearing preset (Pipeline Rules of Thumb Handbook, 96.2 %) agrees with 1/1.04 (Wire Rope Users Manual 4th ed. p. 88) to 0.05 %', () => {
    expect(relErr(SHEAVE_EFFICIENCY_PRESETS.rollingBearing.efficiency, 1 / 1.04)).toBeLessThan(5e-4);
  });
});

/** Step-by-step force balance written independently of the code: from the dead end with a unit tension back to the drum. */
function walkBack(loadKn: number, reevedFromLead: number[], lead: number[]): number {
  let t = 1;
  let carried = 0;
  for (let k = reevedFromLead.length - 1; k >= 0; k -= 1) {
    carried += t; // the part between sheave k and the next one away from the drum
    t /= reevedFromLead[k]; // hoisting: the drum side of a sheave carries the far side ÷ its efficiency
  }
  for (const e of lead) t /= e;
  return (loadKn * t) / carried;
}

describe('leadLinePullBySheave: every sheave at its own efficiency', () => {
  // Lead-line factors (lead-line pull ÷ load) for n parts, Wire Rope Users Manual 4th ed. (Wire Rope Technical Board),
  // table of lead-line factors beside p. 88: only the 4-part plain value 0.309 is seen on the published page; the
  // others are the same table from memory.
  const plainTable: [number, number][] = [[1, 1.09], [2, 0.568], [3, 0.395], [4, 0.309], [5, 0.257], [6, 0.223], [7, 0.199], [8, 0.181]];
  const rollerTable: [number, number][] = [[1, 1.04], [2, 0.53], [3, 0.36], [4, 0.275], [5, 0.225], [6, 0.191], [7, 0.167], [8, 0.148]];
  for (const [name, table, k] of [['plain', plainTable, 1.09], ['anti-friction', rollerTable, 1.04]] as const) {
    for (const [n, factor] of table) {
      it(`${name} bearings, ${n} part${n === 1 ? '' : 's'}: lead-line factor ${factor} (WRUM 4th ed.)`, () => {
        const e = 1 / k;
        const r = leadLinePullBySheave({ loadKn: 1, parts: n, tipSheaveEfficiency: e, blockSheaveEfficiency: e, leadSheaveEfficiencies: [] });
        // the table prints three decimals
        expect(Math.abs(r.leadLinePullKn - factor)).toBeLessThanOrEqual(0.0006);
      });
    }
  }

  it('WRUM 4th ed. p. 88 worked example: 4 parts plain, two extra plain lead sheaves, 6,000 lb → 0.309 × 1.09 × 1.09 = 0.367 → 2,202 lb', () => {
    const e = 1 / 1.09;
    const r = leadLinePullBySheave({ loadKn: lbfToKn(6000), parts: 4, tipSheaveEfficiency: e, blockSheaveEfficiency: e, leadSheaveEfficiencies: [e, e] });
    expect(relErr(r.leadLinePullKn, lbfToKn(2202))).toBeLessThan(0.001);
  });

  it('the same p. 88 rule with bearings mixed: anti-friction 4-part factor 0.275 × 1.04 (anti-friction lead) × 1.09 (plain lead) = 0.3117', () => {
    const r = leadLinePullBySheave({ loadKn: 1, parts: 4, tipSheaveEfficiency: 1 / 1.04, blockSheaveEfficiency: 1 / 1.04, leadSheaveEfficiencies: [1 / 1.04, 1 / 1.09] });
    expect(Math.abs(r.leadLinePullKn - 0.275 * 1.04 * 1.09)).toBeLessThan(0.0006 * 1.04 * 1.09);
  });

  it('WRUM 4th ed. p. 86, static case: 6,000 lb on 4 parts without friction → 1,500 lb', () => {
    const r = leadLinePullBySheave({ loadKn: lbfToKn(6000), parts: 4, tipSheaveEfficiency: 1, blockSheaveEfficiency: 1, leadSheaveEfficiencies: [] });
    expect(relErr(r.leadLinePullKn, lbfToKn(1500))).toBeLessThan(1e-12);
  });

  it('equals an independent step-by-step force balance for any mix of efficiencies (walked back from the dead end)', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 30 }),
        fc.double({ min: 0.85, max: 1, noNaN: true }),
        fc.double({ min: 0.85, max: 1, noNaN: true }),
        fc.array(fc.double({ min: 0.85, max: 1, noNaN: true }), { maxLength: 6 }),
        fc.double({ min: 1, max: 5000, noNaN: true }),
        (parts, tip, block, lead, loadKn) => {
          const reeved = Array.from({ length: parts }, (_, i) => (i % 2 === 0 ? tip : block));
          const r = leadLinePullBySheave({ loadKn, parts, tipSheaveEfficiency: tip, blockSheaveEfficiency: block, leadSheaveEfficiencies: lead });
          expect(relErr(r.leadLinePullKn, walkBack(loadKn, reeved, lead))).toBeLessThan(1e-10);
        },
      ),
      { numRuns: 300, seed: 13 },
    );
  });

  it('a plain sheave anywhere in the path never lowers the pull (safe side of unknown bearings)', () => {
    const base = { loadKn: 500, parts: 6, tipSheaveEfficiency: 0.962, blockSheaveEfficiency: 0.962, leadSheaveEfficiencies: [0.962, 0.962] };
    const rolling = leadLinePullBySheave(base).leadLinePullKn;
    expect(leadLinePullBySheave({ ...base, leadSheaveEfficiencies: [0.962, 0.917] }).leadLinePullKn).toBeGreaterThan(rolling);
    expect(leadLinePullBySheave({ ...base, blockSheaveEfficiency: 0.917 }).leadLinePullKn).toBeGreaterThan(rolling);
    expect(leadLinePullBySheave({ ...base, tipSheaveEfficiency: 0.917 }).leadLinePullKn).toBeGreaterThan(rolling);
  });

  it('reeved sheaves alternate tip and block from the lead side: ⌈n/2⌉ at the tip, ⌊n/2⌋ in the block (common practice, no source)', () => {
    expect(reevedSheaveEfficiencies(5, 0.9, 0.8)).toEqual([0.9, 0.8, 0.9, 0.8, 0.9]);
    expect(reevedSheaveEfficiencies(1, 0.9, 0.8)).toEqual([0.9]);
  });

  it('refuses an efficiency of 0 or above 1 for any sheave, and fractional parts', () => {
    const ok = { loadKn: 100, parts: 4, tipSheaveEfficiency: 0.96, blockSheaveEfficiency: 0.96, leadSheaveEfficiencies: [0.96] };
    expectCalcError(() => leadLinePullBySheave({ ...ok, tipSheaveEfficiency: 0 }), 'tipSheaveEfficiency');
    expectCalcError(() => leadLinePullBySheave({ ...ok, blockSheaveEfficiency: 1.1 }), 'blockSheaveEfficiency');
    expectCalcError(() => leadLinePullBySheave({ ...ok, leadSheaveEfficiencies: [0.9, 0] }), 'leadSheaveEfficiencies');
    expectCalcError(() => leadLinePullBySheave({ ...ok, parts: 2.5 }), 'parts');
    expectCalcError(() => leadLinePullBySheave({ ...ok, loadKn: -1 }), 'loadKn');
  });

  it('requiredPartsBySheave: the smallest n whose independently balanced pull is within the permissible pull', () => {
    const input = { loadKn: 1200, tipSheaveEfficiency: 0.962, blockSheaveEfficiency: 0.962, leadSheaveEfficiencies: [0.962, 0.917], permissibleLinePullKn: 150, maxParts: 18 };
    const r = requiredPartsBySheave(input);
    if (!r.achievable) throw new Error('expected an achievable reeving');
    const pull = (n: number) => walkBack(1200, Array.from({ length: n }, () => 0.962), [0.962, 0.917]);
    expect(pull(r.parts)).toBeLessThanOrEqual(150);
    expect(pull(r.parts - 1)).toBeGreaterThan(150);
    const no = requiredPartsBySheave({ ...input, loadKn: 3000 });
    expect(no.achievable).toBe(false);
  });
});

describe('requiredParts', () => {
  it('frictionless: 6,000 lb within 1,600 lb needs 4 parts (6,000/3 = 2,000 is too much; WRUM static rule)', () => {
    const r = requiredParts({ loadKn: lbfToKn(6000), permissibleLinePullKn: lbfToKn(1600), sheaveEfficiency: 1, extraLeadSheaves: 0 });
    expect(r.achievable).toBe(true);
    expect(r.parts).toBe(4);
  });

  it('is the smallest n: n parts are within the permissible pull, n − 1 are not', () => {
    const input = { loadKn: 1200, permissibleLinePullKn: 135, sheaveEfficiency: 0.962, extraLeadSheaves: 1 };
    const r = requiredParts(input);
    if (!r.achievable) throw new Error('expected an achievable reeving');
    expect(leadLinePull({ ...input, parts: r.parts }).leadLinePullKn).toBeLessThanOrEqual(135);
    expect(leadLinePull({ ...input, parts: r.parts - 1 }).leadLinePullKn).toBeGreaterThan(135);
  });

  it('friction caps MA at E/(1−E) (limit of the handbook formula): 2,000 kN on 150 kN with E = 0.917 cannot be reeved', () => {
    // 0.917 / 0.083 = 11.05 < 2000 / 150 = 13.3
    const r = requiredParts({ loadKn: 2000, permissibleLinePullKn: 150, sheaveEfficiency: 0.917, extraLeadSheaves: 0 });
    expect(r.achievable).toBe(false);
    expect(r.parts).toBeNull();
    if (!r.achievable) expect(r.reason).toMatch(/above the permissible 150 kN/);
  });

  it('writes the pull it could not get below rounded up, never down: 200 kN on one part at E = 0.96 is 208.33 kN, shown 208.4', () => {
    // One part over one sheave: pull = load ÷ E (Wire Rope Users Manual 4th ed., pp. 86–88) = 200 ÷ 0.96 = 208.333… kN.
    const r = requiredParts({ loadKn: 200, permissibleLinePullKn: 150, sheaveEfficiency: 0.96, extraLeadSheaves: 0, maxParts: 1 });
    if (r.achievable) throw new Error('expected no reeving within one part');
    // The pull is shown rounded up (to the nearest it would read 208.3 kN).
    expect(r.reason).toBe('even 1 parts of line leave a lead-line pull of 208.4 kN, above the permissible 150 kN');
    const bySheave = requiredPartsBySheave({ loadKn: 200, permissibleLinePullKn: 150, tipSheaveEfficiency: 0.96, blockSheaveEfficiency: 0.96, leadSheaveEfficiencies: [], maxParts: 1 });
    if (bySheave.achievable) throw new Error('expected no reeving within one part');
    expect(bySheave.reason).toBe('even 1 parts of line leave a lead-line pull of 208.4 kN, above the permissible 150 kN');
  });

  it('refuses a zero permissible pull', () => {
    expectCalcError(
      () => requiredParts({ loadKn: 10, permissibleLinePullKn: 0, sheaveEfficiency: 0.96, extraLeadSheaves: 0 }),
      'permissibleLinePullKn',
    );
  });
});
