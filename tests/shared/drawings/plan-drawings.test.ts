// The planner's drawings checked as data: they must parse as XML, carry no NaN, escape every
// label, draw to scale where they say so, and say pass or fail in words. The figures drawn come
// from the real computation on the invented demo crane, as the server will send them.
import { Window } from 'happy-dom';
import { describe, expect, it } from 'vitest';
import { CalcInputError } from '../../../shared/calc';
import { groundPressureSvg } from '../../../shared/drawings/ground-pressure';
import { reevingSvg, sheavesUsed } from '../../../shared/drawings/reeving';
import { sitePlanSvg } from '../../../shared/drawings/site-plan';
import { computeConfiguration } from '../../../shared/planner/compute';
import type { LoadCaseResult, PowerLineResult } from '../../../shared/planner/types';
import { configurationSchema } from '../../../shared/schemas/configuration';
import { demoAssistCrane, demoCrane, demoKit } from '../helpers';

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

/** 36 m, HB120 × 6, 41 t at 12 m, 200 kPa: the unloaded case fails bare at its worst slew angle and passes on mats. */
const results = computeConfiguration(
  configurationSchema.parse({
    craneUnitId: '6f1c2d3e-4a5b-4c6d-8e7f-0a1b2c3d4e5f',
    boomLengthM: 36,
    mainHook: { hookBlockId: 'HB120', parts: 6 },
    auxiliary: { enabled: false, hookBlockId: null },
    heaviestLoad: { description: 'Radiator bank', loadT: 40, riggingT: 1, radiusM: 12 },
    ground: { groundType: 'Stone over clay', allowablePressureKpa: 200, source: { kind: 'ground_investigation', reference: 'GI R-0001', designer: '' } },
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
  { arrangement: demoCrane(), inventory: demoKit('D'), assistCrane: demoAssistCrane() },
);

describe('reevingSvg', () => {
  it('draws one rope line per part, the sheaves each turn needs, the dead end and the lead-line pull', () => {
    const r = results.reeving!;
    const doc = wellFormed(reevingSvg(r));
    expect(doc.querySelectorAll('line[data-part]')).toHaveLength(6);
    // 6 parts: 3 tip sheaves (the lead sheave and two top turns), 3 block sheaves; HB120 has 6, so 3 unused
    expect(doc.querySelectorAll('circle[data-sheave="tip"]')).toHaveLength(3);
    expect(doc.querySelectorAll('circle[data-sheave="block"][data-state="used"]')).toHaveLength(3);
    expect(doc.querySelectorAll('circle[data-sheave="block"][data-state="unused"]')).toHaveLength(3);
    expect(doc.querySelector('[data-dead-end]')?.getAttribute('data-dead-end')).toBe('tip');
    expect(doc.querySelectorAll('line[data-lead]')).toHaveLength(1);
    const t = texts(doc);
    // 92.52 kN with the plain-bearing base idler at its own efficiency (tests/shared/planner/compute.test.ts works it by hand), shown rounded up as the figure is
    expect(t).toContain('Pull 92.6 kN');
    expect(t).toContain('Dead end (at the boom tip)');
    expect(t).toContain('Hook block HB120: 6 sheaves, 3 in use');
    // the lead sheaves of the demo path, each with its bearing (the base idler is plain)
    expect(t).toContain('Lead sheaves from the drum to the tip:');
    expect(t).toContain('tip-guide, rolling bearing');
    expect(t).toContain('base-idler, plain bearing');
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

  it('draws one curve per case over the full turn, pressures and angles to one scale, with the dashed allowable line', () => {
    expect(cases.map((c) => c.key)).toEqual(['raising', 'lift', 'unloaded']);
    const doc = wellFormed(groundPressureSvg(cases, 200, { trackLengthM: 9.2 }));
    const curves = [...doc.querySelectorAll('polyline[data-case]')];
    expect(curves).toHaveLength(3);
    const allowable = [...doc.querySelectorAll('line[data-allowable-kpa]')];
    expect(allowable).toHaveLength(3);
    for (const line of allowable) expect(line.getAttribute('stroke-dasharray')).toBeTruthy();
    curves.forEach((curve, i) => {
      const pts = (curve.getAttribute('points') ?? '').split(' ').map((pt) => pt.split(',').map(Number));
      // 0° to 180° given and mirrored: 72 angles and the closing point at 360°.
      expect(cases[i].slew).toHaveLength(37);
      expect(pts).toHaveLength(73);
      // x in proportion to the angle, y in proportion to the pressure, one scale for every panel.
      const pxPerDeg = (pts[pts.length - 1][0] - pts[0][0]) / 360;
      const sorted = [...cases[i].slew].sort((a, b) => a.angleDeg - b.angleDeg);
      sorted.forEach((p, k) => expect(pts[k][0] - pts[0][0]).toBeCloseTo(p.angleDeg * pxPerDeg, 1));
      // The far half mirrors the near half: 360° − θ at the height of θ.
      expect(pts[72 - 5][1]).toBeCloseTo(pts[5][1], 6);
      expect(pts[72 - 5][0] - pts[0][0]).toBeCloseTo(335 * pxPerDeg, 1);
      const yAllow = num(allowable[i], 'y1');
      const kAtWorst = sorted.findIndex((p) => p.angleDeg === cases[i].worst.angleDeg);
      const kAt0 = 0;
      // (y0 − y_worst) / (q_worst − q0) = px per kPa = (y0 − y_allow) / (200 − q0)
      const perKpa = (pts[kAt0][1] - pts[kAtWorst][1]) / (cases[i].worst.pressureKpa - sorted[0].pressureKpa || 1);
      if (cases[i].worst.pressureKpa !== sorted[0].pressureKpa) expect((pts[kAt0][1] - yAllow) / (200 - sorted[0].pressureKpa)).toBeCloseTo(perKpa, 2);
      expect(Number(curve.getAttribute('data-worst-angle'))).toBe(cases[i].worst.angleDeg);
    });
  });

  it('marks the worst angle with a triangle and words, names the end and the side, and gives the result as a word', () => {
    const doc = wellFormed(groundPressureSvg(cases, 200, { trackLengthM: 9.2 }));
    const t = texts(doc);
    const unloaded = cases[2];
    expect(doc.querySelectorAll('polygon[data-worst]')).toHaveLength(3);
    // shown rounded up, as the figures are: 257.71 → 257.8
    const shown = (Math.ceil(unloaded.worst.pressureKpa * 10 - 1e-9) / 10).toFixed(1);
    expect(t).toContain(`worst ${shown} kPa at ${unloaded.worst.angleDeg}°`);
    expect(t.some((x) => x.startsWith(`worst ${shown} kPa at ${unloaded.worst.angleDeg}° slew (rigid plane)`))).toBe(true);
    expect(t.filter((x) => x === 'end').length).toBeGreaterThanOrEqual(3);
    expect(t.filter((x) => x === 'side').length).toBeGreaterThanOrEqual(2);
    // 200 kPa allowed: raising and lift pass, the unloaded case (about 258 kPa) fails bare and passes on mats
    expect(t.filter((x) => x === 'PASS').length).toBeGreaterThanOrEqual(4);
    expect(t).toContain('FAIL');
    expect(t).toContain('allowable 200 kPa');
    expect(t).toContain('with mats');
    expect(t).toContain(`${unloaded.mats!.pressureKpa.toFixed(1)} kPa`);
    expect(t.some((x) => x.includes('Tracks 9.2 m long'))).toBe(true);
  });

  it('says UNVERIFIED without a ground source and CAUTION when weights are missing, never PASS; fits a phone', () => {
    const doc = wellFormed(groundPressureSvg(cases.slice(0, 2), 200, { unverified: true }));
    expect(texts(doc).filter((x) => x === 'UNVERIFIED').length).toBeGreaterThanOrEqual(2);
    expect(texts(doc)).not.toContain('PASS');
    const caution = wellFormed(groundPressureSvg(cases.slice(0, 2), 200, { caution: true, widthPx: 380 }));
    expect(texts(caution)).toContain('CAUTION');
    expect(texts(caution)).not.toContain('PASS');
    expect(caution.documentElement.getAttribute('width')).toBe('380');
  });

  it('escapes labels, draws an empty list as a sentence, and refuses a NaN pressure', () => {
    const odd: LoadCaseResult = { ...cases[0], label: 'Raising <A&B> "test"' };
    const svg = groundPressureSvg([odd], 200, { theme: 'night' });
    expect(svg).toContain('Raising &lt;A&amp;B&gt; &quot;test&quot;');
    expect(texts(wellFormed(svg))).toContain('Raising <A&B> "test"');
    expect(texts(wellFormed(groundPressureSvg([], 200)))).toContain('No load cases to draw.');
    const bad: LoadCaseResult = { ...cases[0], slew: cases[0].slew.map((p, i) => (i === 3 ? { ...p, pressureKpa: Number.NaN } : p)) };
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

  it('writes the fall zone rounded up to 0.1 m in the title, as on its label: 40.41 m reads 40.5 m, never 40.41 or 40.4', () => {
    const doc = wellFormed(sitePlanSvg({ ...input, fallZoneRadiusM: 40.41 }));
    // Shown rounded up: the title and the label state the same figure.
    expect(doc.querySelector('title')?.textContent).toBe('Site plan: boom 36 m, reach 42.4 m, fall zone 40.5 m, 2 power lines');
    expect(texts(doc)).toContain('Fall zone 40.5 m');
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
    // The words wrap to the drawing's width: read them as one text.
    const all = t.join(' ');
    // 50 − 42.4 = 7.6 m left; 40 − 42.4 = −2.4 m: the boom reaches past the 220 kV line.
    expect(all).toContain('CLEAR 1. 33 kV line <east> & "yard": 33 kV, 50 m away; clearance 6.10 m (20 ft default, up to 350 kV); 7.6 m available');
    expect(all).toContain('TOO CLOSE 2. 220 kV line: 220 kV, 40 m away; clearance 6.10 m (20 ft default, up to 350 kV); -2.4 m available');
    expect(t).toContain('Reach 42.4 m');
    expect(t).toContain('1: 33 kV');
    expect(t).toContain('Fall zone 40.4 m');
    expect(t.some((x) => /^\d+ m$/.test(x))).toBe(true); // the scale bar's length
  });

  it('at phone width (360 px) the words wrap inside the drawing', () => {
    const doc = wellFormed(sitePlanSvg(input, { sizePx: 360 }));
    // Left-anchored 12 px rows, at about 0.6 em per character (a generous width for the fonts used).
    for (const el of [...doc.querySelectorAll('text[font-size="12"]')].filter((e) => !e.getAttribute('text-anchor'))) {
      expect(num(el, 'x') + (el.textContent ?? '').length * 12 * 0.6, el.textContent ?? '').toBeLessThanOrEqual(360 + 12);
    }
  });

  it('shows a line above the table as needing the owner’s distance, and refuses a non-finite distance', () => {
    const above: PowerLineResult = { label: 'HVDC', voltageKv: 1200, distanceM: 80, requiredClearanceM: null, availableClearanceM: 44, reachM: 36, basis: 'owner', basisWords: 'over 1,000 kV', pass: false, assist: null };
    const t = texts(wellFormed(sitePlanSvg({ ...input, powerLines: [above] })));
    expect(t.some((x) => x.includes('clearance: ask the line owner'))).toBe(true);
    expect(() => sitePlanSvg({ ...input, powerLines: [{ ...above, distanceM: Number.POSITIVE_INFINITY }] })).toThrow(CalcInputError);
  });
});
