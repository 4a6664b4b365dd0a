// Power-line distances against 29 CFR 1926 Subpart CC as recalled (from memory: the regulation's
// text was not re-read here), metres through mathjs (an independent units library).
import { describe, expect, it } from 'vitest';
import { unit } from 'mathjs';
import { fallZoneRadiusM, powerLineClearanceCheck, powerLineClearanceM, powerLineMinimumDistance } from '../../../shared/calc';
import { expectCalcError } from '../helpers';

const ftInM = (ft: number) => unit(ft, 'ft').toNumber('m');

describe('powerLineClearanceM: 29 CFR 1926.1408 Table A (from memory)', () => {
  // Table A rows (nominal kV, AC → feet); "over 50 to 200 means up to and including 200 kV".
  const tableA: Array<[number, number]> = [
    [50, 10],
    [200, 15],
    [350, 20],
    [500, 25],
    [750, 35],
    [1000, 45],
  ];
  for (const [kv, ft] of tableA) {
    it(`up to and including ${kv} kV → ${ft} ft (mathjs ft → m)`, () => {
      const r = powerLineClearanceM(kv);
      expect(r.clearanceFt).toBe(ft);
      expect(r.clearanceM).toBeCloseTo(ftInM(ft), 12);
      expect(r.rule).toMatch(/1926\.1408 Table A/);
    });
  }

  it('just over a band edge moves to the next row: 50.1 kV → 15 ft, 11 kV → 10 ft (3.05 m)', () => {
    expect(powerLineClearanceM(50.1).clearanceFt).toBe(15);
    expect(powerLineClearanceM(11).clearanceM).toBeCloseTo(3.05, 2);
  });

  it('over 1,000 kV the table defers to the utility or a registered professional engineer', () => {
    const r = powerLineClearanceM(1100);
    expect(r.clearanceM).toBeNull();
    if (r.clearanceM === null && 'reason' in r) expect(r.reason).toMatch(/utility owner\/operator/);
  });

  it('refuses zero and negative voltages', () => {
    expectCalcError(() => powerLineClearanceM(0), 'kv');
    expectCalcError(() => powerLineClearanceM(-11), 'kv');
  });
});

describe('powerLineMinimumDistance: the default unless Table A may be used (29 CFR 1926.1407-1409, from memory)', () => {
  const none = { voltageConfirmedByOwner: false, encroachmentPreventionInPlace: false };
  const both = { voltageConfirmedByOwner: true, encroachmentPreventionInPlace: true };

  it('by default 20 ft (6.096 m) up to 350 kV, even where Table A would allow 10 ft', () => {
    for (const kv of [0.4, 11, 33, 132, 275, 350]) {
      const r = powerLineMinimumDistance({ voltageKv: kv, ...none });
      expect(r.clearanceFt).toBe(20);
      expect(r.clearanceM).toBeCloseTo(ftInM(20), 12);
      expect(r.basis).toBe('default');
    }
    expect(powerLineMinimumDistance({ voltageKv: 11, ...none }).why).toMatch(/Table A \(10 ft for this voltage\)/);
  });

  it('by default 50 ft (15.24 m) over 350 kV (1926.1409), where Table A gives 25 to 45 ft', () => {
    for (const kv of [350.1, 400, 765, 1000]) {
      const r = powerLineMinimumDistance({ voltageKv: kv, ...none });
      expect(r.clearanceFt).toBe(50);
      expect(r.clearanceM).toBeCloseTo(ftInM(50), 12);
    }
  });

  it('voltage unknown → the larger distance, 50 ft, whatever else is recorded', () => {
    const r = powerLineMinimumDistance({ voltageKv: null, ...both });
    expect(r).toMatchObject({ clearanceFt: 50, basis: 'default_unknown_voltage' });
    expect(r.why).toMatch(/not known/);
  });

  it('Table A only with BOTH the owner’s confirmed voltage and encroachment prevention in place', () => {
    expect(powerLineMinimumDistance({ voltageKv: 11, ...both })).toMatchObject({ clearanceFt: 10, basis: 'table_a' });
    expect(powerLineMinimumDistance({ voltageKv: 400, ...both })).toMatchObject({ clearanceFt: 25, basis: 'table_a' });
    const onlyVoltage = powerLineMinimumDistance({ voltageKv: 11, voltageConfirmedByOwner: true, encroachmentPreventionInPlace: false });
    expect(onlyVoltage).toMatchObject({ clearanceFt: 20, basis: 'default' });
    expect(onlyVoltage.why).toMatch(/encroachment-prevention measures in place, which is not recorded/);
    const onlyMeasures = powerLineMinimumDistance({ voltageKv: 11, voltageConfirmedByOwner: false, encroachmentPreventionInPlace: true });
    expect(onlyMeasures).toMatchObject({ clearanceFt: 20, basis: 'default' });
    expect(onlyMeasures.why).toMatch(/owner’s confirmation of the voltage, which is not recorded/);
  });

  it('the default is never smaller than Table A for any voltage up to 1,000 kV (safe side)', () => {
    for (let kv = 1; kv <= 1000; kv += 1) {
      const def = powerLineMinimumDistance({ voltageKv: kv, ...none }).clearanceM!;
      const tableA = powerLineMinimumDistance({ voltageKv: kv, ...both }).clearanceM!;
      expect(def).toBeGreaterThanOrEqual(tableA);
    }
  });

  it('over 1,000 kV: the owner’s distance, never a number of ours', () => {
    expect(powerLineMinimumDistance({ voltageKv: 1100, ...none })).toMatchObject({ clearanceM: null, basis: 'owner' });
  });

  it('the rule says it is from memory', () => {
    expect(powerLineMinimumDistance({ voltageKv: 11, ...none }).rule).toMatch(/1926\.1407.*1926\.1408.*1926\.1409.*from memory/);
  });
});

describe('powerLineClearanceCheck (common practice, no source for the geometry)', () => {
  it('20 ft (6.096 m, mathjs) needed: 6.1 m left passes, 6.09 m left fails', () => {
    const required = ftInM(20);
    expect(powerLineClearanceCheck({ distanceM: 72.5, reachM: 66.4, requiredM: required }).pass).toBe(true);
    expect(powerLineClearanceCheck({ distanceM: 72.49, reachM: 66.4, requiredM: required }).pass).toBe(false);
  });
  it('a line inside the reach leaves a negative distance', () => {
    expect(powerLineClearanceCheck({ distanceM: 40, reachM: 50, requiredM: 3 })).toEqual({ availableM: -10, pass: false });
  });
});

describe('fallZoneRadiusM (common practice, no source; margin is a site setting)', () => {
  it('counts the boom foot ahead of the slewing centre and the tip extension', () => {
    const r = fallZoneRadiusM({ boomFootAheadM: 1.4, boomLengthM: 90, tipExtensionM: 1.5, marginM: 5 });
    expect(r.radiusM).toBeCloseTo(97.9, 12);
    expect(r.rule).toMatch(/boom foot ahead of the slewing centre/);
    expect(r.rule).toMatch(/common practice, no source/);
  });
  it('refuses a zero boom length and a negative margin or foot offset', () => {
    expectCalcError(() => fallZoneRadiusM({ boomFootAheadM: 0, boomLengthM: 0, tipExtensionM: 0, marginM: 5 }), 'boomLengthM');
    expectCalcError(() => fallZoneRadiusM({ boomFootAheadM: 0, boomLengthM: 30, tipExtensionM: 0, marginM: -1 }), 'marginM');
    expectCalcError(() => fallZoneRadiusM({ boomFootAheadM: -1, boomLengthM: 30, tipExtensionM: 0, marginM: 1 }), 'boomFootAheadM');
  });
});
