// The planner's drawings checked as data: they must parse as XML, carry no NaN, escape every
// label, draw to scale where they say so, and say pass or fail in words. The figures drawn come
// from the real computation on the invented demo crane, as the server will send them.
import { Window } from 'happy-dom';
import { describe, expect, it } from 'vitest';
import { CalcInputError } from '../../shared/calc';
import { groundPressureSvg } from '../../shared/drawings/ground-pressure';
import { reevingSvg, sheavesUsed } from '../../shared/drawings/reeving';
import { sitePlanSvg } from '../../shared/drawings/site-plan';
import { computeConfiguration } from '../../shared/planner';
import type { LoadCaseResult, PowerLineResult } from '../../shared/planner';
import type { InventoryItem } from '../../shared/schemas/arrangement';
import { configurationSchema } from '../../shared/schemas/configuration';
import { demoAssistCrane, demoCrane } from './helpers';

function parse(svg: string): Document {
  const window = new Window();
  return new window.DOMParser().parseFromString(svg, 'image/svg+xml') as unknown as Document;
}

function wellFormed(svg: string): Document {
  expect(svg).not.toMatch(/NaN|Infinity|undefined/);
  const doc = parse(svg);
  expect(doc.querySelector('parsererror')).toBeNull();
  expect(doc.documentElement.tagName.toLowerCase()).toBe('svg');
  return doc;
}

function texts(doc: Document): string[] {
  return [...doc.querySelectorAll('text')].map((t) => t.textContent ?? '');
}

const num = (el: Element | null, attr: string) => Number(el?.getAttribute(attr));

function kit(): InventoryItem[] {
  const items: InventoryItem[] = [];
  const kinds: [InventoryItem['kind'], string, number][] = [
    ['section', 'base', 1],
    ['section', 'ins3', 1],
    ['section', 'ins6', 1],
    ['section', 'ins12', 6],
    ['section', 'tip', 1],
    ['guy_line', 'GT', 2],
    ['guy_line', 'GB', 2],
    ['guy_line', 'G3', 2],
    ['guy_line', 'G6', 2],
    ['guy_line', 'G12', 12],
    ['hook_block', 'HB120', 1],
  ];
  for (const [kind, typeId, n] of kinds) for (let i = 1; i <= n; i += 1) items.push({ serial: `D-${typeId}-${i}`, kind, typeId, status: 'serviceable' });
  return items;
}

/** 36 m, HB120 × 6, 41 t at 12 m, 200 kPa: the unloaded case lifts the front of the track and fails bare, passes on mats. */
const results = computeConfiguration(
  configurationSchema.parse({
    craneUnitId: '6f1c2d3e-4a5b-4c6d-8e7f-0a1b2c3d4e5f',
    boomLengthM: 36,
    mainHook: { hookBlockId: 'HB120', parts: 6 },
    auxiliary: { enabled: false, hookBlockId: null },
    heaviestLoad: { description: 'Radiator bank', loadT: 40, riggingT: 1, radiusM: 12 },
    ground: { groundType: 'Stone over clay', allowablePressureKpa: 200, source: { kind: 'ground_investigation', reference: 'GI R-0001' } },
    mats: { used: true, lengthM: 5, widthM: 1.2, thicknessM: 0.3, weightKg: 1500 },
    assist: { assistCraneId: null, chartId: null, lifts: [] },
    siteHazards: {
      powerLines: [
        { label: '33 kV line <east> & "yard"', voltageKv: 33, distanceM: 50 },
        { label: '220 kV line', voltageKv: 220, distanceM: 40 },
      ],
      buriedServices: '',
      neighbours: '',
    },
    fallZoneMarginM: 3,
  }),
  { arrangement: demoCrane(), inventory: kit(), assistCrane: demoAssistCrane() },
);

describe('reevingSvg', () => {
  it('draws one rope line per part, the sheaves each turn needs, the dead end and the lead-line pull', () => {
    const r = results.reeving!;
    const doc = wellFormed(reevingSvg(r));
    expect(doc.querySelectorAll('line[data-part]')).toHaveLength(6);
    // 6 parts: 3 tip sheaves (the lead sheave and two top turns), 3 block sheaves; HB120 has 5, so 2 unused
    expect(doc.querySelectorAll('circle[data-sheave="tip"]')).toHaveLength(3);
    expect(doc.querySelectorAll('circle[data-sheave="block"][data-state="used"]')).toHaveLength(3);
    expect(doc.querySelectorAll('circle[data-sheave="block"][data-state="unused"]')).toHaveLength(2);
    expect(doc.querySelector('[data-dead-end]')?.getAttribute('data-dead-end')).toBe('tip');
    expect(doc.querySelectorAll('line[data-lead]')).toHaveLength(1);
    const t = texts(doc);
    expect(t).toContain('Pull 88.2 kN');
    expect(t).toContain('Dead end (at the boom tip)');
    expect(t).toContain('Hook block HB120: 5 sheaves, 3 in use');
  });

  it('puts the dead end at the block for an odd number of parts, and every part between the tip and block rows', () => {
    for (const parts of [1, 3, 5, 7, 10]) {
      const doc = wellFormed(reevingSvg({ parts, sheaveCount: 5, hookBlockId: 'HB120', leadLinePullKn: 100 }));
      expect(doc.querySelector('[data-dead-end]')?.getAttribute('data-dead-end')).toBe(parts % 2 === 1 ? 'block' : 'tip');
      expect(doc.querySelectorAll('circle[data-sheave="tip"]')).toHaveLength(sheavesUsed(parts).tip);
      expect(doc.querySelectorAll('circle[data-sheave="block"][data-state="used"]')).toHaveLength(sheavesUsed(parts).block);
      const xs = [...doc.querySelectorAll('line[data-part]')].map((l) => num(l, 'x1'));
      expect(xs).toEqual([...xs].sort((a, b) => a - b));
      expect(new Set(xs).size).toBe(parts);
    }
  });

  it('warns in words when the parts need more sheaves than the block has, escapes the block id, and has a night theme', () => {
    const svg = reevingSvg({ parts: 8, sheaveCount: 2, hookBlockId: 'HB<45>&"x"', leadLinePullKn: 12.34 }, { theme: 'night' });
    const doc = wellFormed(svg);
    expect(svg).toContain('HB&lt;45&gt;&amp;&quot;x&quot;');
    expect(texts(doc).some((t) => t.startsWith('WARNING: 8 parts need 4 block sheaves; HB<45>&"x" has 2'))).toBe(true);
    expect(doc.querySelector('rect')?.getAttribute('fill')).toBe('#1f1b16');
    expect(reevingSvg({ parts: 8, sheaveCount: 2, hookBlockId: 'x', leadLinePullKn: 1 })).toContain('fill="#ffffff"');
  });

  it('refuses parts that are not a whole number and a pull that is not finite', () => {
    expect(() => reevingSvg({ parts: 2.5, sheaveCount: 5, hookBlockId: 'x', leadLinePullKn: 1 })).toThrow(CalcInputError);
    expect(() => reevingSvg({ parts: 4, sheaveCount: 5, hookBlockId: 'x', leadLinePullKn: Number.NaN })).toThrow(CalcInputError);
  });
});

describe('groundPressureSvg', () => {
  const cases = results.loadCases;

  it('draws one pressure block per case, heights in proportion to the maximum pressure, with the dashed allowable line', () => {
    expect(cases.map((c) => c.key)).toEqual(['raising', 'overEnd', 'overSide', 'unloaded']);
    const doc = wellFormed(groundPressureSvg(cases, 200, { trackLengthM: 9.2 }));
    const polys = [...doc.querySelectorAll('polygon[data-case]')];
    expect(polys).toHaveLength(4);
    // Height of each block at its heavy end (second point) above its base (first point), per kPa: one scale for all.
    const perKpa = polys.map((poly, i) => {
      const pts = (poly.getAttribute('points') ?? '').split(' ').map((pt) => pt.split(',').map(Number));
      return (pts[0][1] - pts[1][1]) / cases[i].track.maxPressureKpa;
    });
    for (const s of perKpa) expect(s).toBeCloseTo(perKpa[0], 2);
    const allowable = [...doc.querySelectorAll('line[data-allowable-kpa]')];
    expect(allowable).toHaveLength(4);
    for (const line of allowable) expect(line.getAttribute('stroke-dasharray')).toBeTruthy();
    // And the dashed line sits 200 kPa above the track at the same scale.
    const firstBase = Number((polys[0].getAttribute('points') ?? '').split(' ')[0].split(',')[1]);
    expect((firstBase - num(allowable[0], 'y1')) / 200).toBeCloseTo(perKpa[0], 2);
  });

  it('writes the maximum in kPa and the result as a word; the lifted length is shown and named', () => {
    const doc = wellFormed(groundPressureSvg(cases, 200, { trackLengthM: 9.2 }));
    const t = texts(doc);
    expect(t).toContain('max 171.0 kPa');
    expect(t).toContain('max 246.5 kPa');
    expect(t.filter((x) => x === 'PASS').length).toBeGreaterThanOrEqual(3);
    expect(t).toContain('FAIL');
    expect(t).toContain('allowable 200 kPa');
    // unloaded: e = 1.7467 m > L/6, contact 3 × (4.6 − 1.7467) = 8.56 m, so 9.2 − 8.56 = 0.64 m lifts
    expect(t).toContain('track lifts: 0.64 m');
    expect(t).toContain('with mats');
    expect(t).toContain('155.3 kPa');
    // The block spans its contact length at the same metres scale as the track.
    const track = doc.querySelector('rect[data-track-length-m]');
    const poly = doc.querySelector('polygon[data-case="unloaded"]');
    const xs = (poly?.getAttribute('points') ?? '').split(' ').map((pt) => Number(pt.split(',')[0]));
    const spanPx = Math.max(...xs) - Math.min(...xs);
    expect(spanPx / num(track, 'width')).toBeCloseTo(cases[3].track.contactLengthM / 9.2, 3);
  });

  it('reads the track length from a full-contact case when not given, and says UNVERIFIED without a ground source', () => {
    const a = groundPressureSvg(cases, 200, { trackLengthM: 9.2 });
    expect(groundPressureSvg(cases, 200)).toBe(a);
    const doc = wellFormed(groundPressureSvg(cases.slice(0, 3), 200, { unverified: true }));
    expect(texts(doc).filter((x) => x === 'UNVERIFIED').length).toBeGreaterThanOrEqual(3);
    expect(texts(doc)).not.toContain('PASS');
  });

  it('escapes labels, draws an empty list as a sentence, and refuses a NaN pressure', () => {
    const odd: LoadCaseResult = { ...cases[0], label: 'Raising <A&B> "test"' };
    const svg = groundPressureSvg([odd], 200, { theme: 'night' });
    expect(svg).toContain('Raising &lt;A&amp;B&gt; &quot;test&quot;');
    expect(texts(wellFormed(svg))).toContain('Raising <A&B> "test"');
    expect(texts(wellFormed(groundPressureSvg([], 200)))).toContain('No load cases to draw.');
    const bad: LoadCaseResult = { ...cases[0], track: { ...cases[0].track, maxPressureKpa: Number.NaN } };
    expect(() => groundPressureSvg([bad], 200)).toThrow(CalcInputError);
  });
});

describe('sitePlanSvg', () => {
  // Demo crane: boom foot 1.4 m ahead of the slewing centre; default allowances 3 m (hook, load,
  // tag lines) and 2 m (sway). Fall zone 1.4 + 36 + 3 = 40.4 m; reach 1.4 + 36 + 3 + 2 = 42.4 m.
  const input = { boomLengthM: 36, fallZoneRadiusM: results.fallZoneRadiusM, reachM: results.powerLines[0].reachM, powerLines: results.powerLines, trackLengthM: 9.2, gaugeM: 7, trackWidthM: 1.2 };

  it('draws the fall zone, the reach, power lines and scale bar at one scale', () => {
    const doc = wellFormed(sitePlanSvg(input));
    const fall = doc.querySelector('circle[data-fall-zone-m]');
    const reach = doc.querySelector('circle[data-reach-m]');
    const bar = doc.querySelector('line[data-scale-bar-m]');
    const pxPerM = num(fall, 'r') / 40.4;
    expect(num(reach, 'r') / 42.4).toBeCloseTo(pxPerM, 2);
    expect((num(bar, 'x2') - num(bar, 'x1')) / num(bar, 'data-scale-bar-m')).toBeCloseTo(pxPerM, 2);
    // Line 1 (50 m) is drawn to the right of the centre at 50 m × scale.
    const cx = num(fall, 'cx');
    const line = doc.querySelector('line[data-power-line="0"]');
    expect((num(line, 'x1') - cx) / 50).toBeCloseTo(pxPerM, 2);
    // Its clearance band is the 20 ft = 6.096 m default (29 CFR 1926.1408, from memory) deep, on the crane side.
    const band = doc.querySelector('polygon[data-clearance-m]');
    const bandXs = (band?.getAttribute('points') ?? '').split(' ').map((pt) => Number(pt.split(',')[0]));
    expect((Math.max(...bandXs) - Math.min(...bandXs)) / 6.096).toBeCloseTo(pxPerM, 2);
    // Tracks to scale: 9.2 m long.
    const track = doc.querySelector('rect[data-track]');
    expect(num(track, 'width') / 9.2).toBeCloseTo(pxPerM, 2);
  });

  it('the fall-zone circle grows with the number', () => {
    // Without lines farther out, the extent follows the fall zone; compare with the reach circle at a fixed reach.
    const small = wellFormed(sitePlanSvg({ ...input, powerLines: [], fallZoneRadiusM: 40 }));
    const large = wellFormed(sitePlanSvg({ ...input, powerLines: [], fallZoneRadiusM: 80 }));
    const ratio = (d: Document) => num(d.querySelector('circle[data-fall-zone-m]'), 'r') / num(d.querySelector('circle[data-reach-m]'), 'r');
    expect(ratio(small)).toBeCloseTo(40 / 42.4, 3);
    expect(ratio(large)).toBeCloseTo(80 / 42.4, 3);
  });

  it('labels each line with voltage, clearance and a word, escaped, and says it is a plan without a bearing', () => {
    const svg = sitePlanSvg(input, { theme: 'night' });
    expect(svg).toContain('&lt;east&gt; &amp; &quot;yard&quot;');
    const t = texts(wellFormed(svg));
    expect(t).toContain('Plan, distances from the slewing centre');
    expect(t.some((x) => x.includes('33 kV line <east> & "yard": 33 kV, 50 m away'))).toBe(true);
    // 50 − 42.4 = 7.6 m left; 40 − 42.4 = −2.4 m: the boom reaches past the 220 kV line.
    expect(t).toContain('clearance 6.10 m (20 ft default, up to 350 kV), 7.6 m available');
    expect(t).toContain('clearance 6.10 m (20 ft default, up to 350 kV), -2.4 m available');
    expect(t).toContain('Reach 42.4 m');
    expect(t).toContain('CLEAR');
    expect(t).toContain('TOO CLOSE');
    expect(t).toContain('1: 33 kV');
    expect(t).toContain('Fall zone 40.4 m');
    expect(t.some((x) => /^\d+ m$/.test(x))).toBe(true); // the scale bar's length
  });

  it('shows a line above the table as needing the owner’s distance, and refuses a non-finite distance', () => {
    const above: PowerLineResult = { label: 'HVDC', voltageKv: 1200, distanceM: 80, requiredClearanceM: null, availableClearanceM: 44, reachM: 36, basis: 'owner', basisWords: 'over 1,000 kV', pass: false, assist: null };
    const t = texts(wellFormed(sitePlanSvg({ ...input, powerLines: [above] })));
    expect(t.some((x) => x.includes('clearance: ask the line owner'))).toBe(true);
    expect(() => sitePlanSvg({ ...input, powerLines: [{ ...above, distanceM: Number.POSITIVE_INFINITY }] })).toThrow(CalcInputError);
  });
});
