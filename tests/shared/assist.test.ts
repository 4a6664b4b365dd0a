// Reading an assist-crane chart at the next longer listed radius, without interpolation or
// extrapolation, is common practice, no source; the assist crane's own chart governs.
import { describe, expect, it } from 'vitest';
import { evaluate } from 'mathjs';
import { assistLiftCheck, chartCapacityKn } from '../../shared/calc';
import { demoAssistCrane, expectCalcError, relErr } from './helpers';

const chart = demoAssistCrane().charts[0]; // invented: 3.0 m 50 t … 8.0 m 19.5 t, 9.0 m 16.5 t
const tToKn = (t: number) => evaluate(`${t} tonne * gravity`).toNumber('kN');

describe('chartCapacityKn (common practice, no source)', () => {
  it('a listed radius reads its own capacity, tonnes → kN as mathjs converts them', () => {
    const r = chartCapacityKn(chart, 8);
    expect(r.covered).toBe(true);
    if (r.covered) {
      expect(r.chartRadiusM).toBe(8);
      expect(relErr(r.capacityKn, tToKn(19.5))).toBeLessThan(1e-12);
    }
  });

  it('between radii reads the next longer radius, never an interpolated value', () => {
    const r = chartCapacityKn(chart, 7.01);
    expect(r.covered && r.chartRadiusM).toBe(8);
    if (r.covered) expect(relErr(r.capacityKn, tToKn(19.5))).toBeLessThan(1e-12);
  });

  it('beyond the last radius there is no capacity', () => {
    const r = chartCapacityKn(chart, 9.01);
    expect(r.covered).toBe(false);
    expect(r.capacityKn).toBeNull();
    if (!r.covered) expect(r.reason).toMatch(/beyond the chart's last radius 9 m/);
  });

  it('inside the shortest radius is not covered either', () => {
    expect(chartCapacityKn(chart, 2.5).covered).toBe(false);
  });

  it('refuses a zero or NaN radius', () => {
    expectCalcError(() => chartCapacityKn(chart, 0), 'radiusM');
    expectCalcError(() => chartCapacityKn(chart, Number.NaN), 'radiusM');
  });
});

describe('assistLiftCheck (common practice, no source)', () => {
  it('exactly 100 % passes, anything above fails', () => {
    const capacity = tToKn(19.5);
    const at = assistLiftCheck({ liftKn: capacity - 5, riggingKn: 5, chart, radiusM: 7.5 });
    expect(at.sharePercent).toBeCloseTo(100, 9);
    expect(at.pass).toBe(true);
    const over = assistLiftCheck({ liftKn: capacity - 4.9, riggingKn: 5, chart, radiusM: 7.5 });
    expect(over.pass).toBe(false);
    expect(over.reason).toMatch(/above 100 %/);
  });

  it('the base section of the demo crane (7.8 t) with 0.3 t rigging at 8 m is 41.5 % of 19.5 t', () => {
    const r = assistLiftCheck({ liftKn: tToKn(7.8), riggingKn: tToKn(0.3), chart, radiusM: 8 });
    expect(r.sharePercent).toBeCloseTo((8.1 / 19.5) * 100, 9);
    expect(r.pass).toBe(true);
  });

  it('off the chart fails with the reason, no share', () => {
    const r = assistLiftCheck({ liftKn: 10, riggingKn: 1, chart, radiusM: 12 });
    expect(r.pass).toBe(false);
    expect(r.sharePercent).toBeNull();
  });
});
