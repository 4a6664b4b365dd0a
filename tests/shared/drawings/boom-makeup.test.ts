// The boom drawing is checked as data: it must parse as XML, be drawn to scale and carry every
// label, escaped. The demo crane's arrangement data is invented; the make-up comes from the real
// calculation so the drawing is tested against what the server will send.
import { Window } from 'happy-dom';
import { describe, expect, it } from 'vitest';
import { boomMakeup, type InventoryItem } from '../../../shared/calc';
import { boomMakeupSvg, escapeXml } from '../../../shared/drawings/boom-makeup';
import { demoCrane } from '../helpers';

const crane = demoCrane();

function parse(svg: string): Document {
  const window = new Window();
  const doc = new window.DOMParser().parseFromString(svg, 'image/svg+xml') as unknown as Document;
  return doc;
}

function sectionRects(doc: Document): { position: number; lengthM: number; widthPx: number }[] {
  return [...doc.querySelectorAll('rect[data-position]')].map((r) => ({
    position: Number(r.getAttribute('data-position')),
    lengthM: Number(r.getAttribute('data-length-m')),
    widthPx: Number(r.getAttribute('width')),
  }));
}

function kit(): InventoryItem[] {
  const items: InventoryItem[] = [
    { serial: 'B-801', kind: 'section', typeId: 'base', status: 'serviceable' },
    { serial: 'I12-<7>&"x"', kind: 'section', typeId: 'ins12', status: 'serviceable' },
    { serial: 'I12-002', kind: 'section', typeId: 'ins12', status: 'quarantined' },
    { serial: 'I3-001', kind: 'section', typeId: 'ins3', status: 'serviceable' },
    { serial: 'T-701', kind: 'section', typeId: 'tip', status: 'serviceable' },
  ];
  for (const [mark, n] of Object.entries({ GT: 2, G12: 4, G3: 2, GB: 2 })) {
    for (let i = 1; i <= n; i += 1) items.push({ serial: `L-${mark}-${i}`, kind: 'guy_line', typeId: mark, status: 'serviceable' });
  }
  return items;
}

describe('boomMakeupSvg', () => {
  it('draws a make-up as well-formed SVG with sections to scale, foot to tip', () => {
    // 42 m: base 8, ins12, ins12, ins3, tip 7. One ins12 at hand is quarantined.
    const makeup = boomMakeup(crane, 42, kit());
    expect(makeup.buildable).toBe(false);
    const svg = boomMakeupSvg(makeup, { sectionTypes: crane.sectionTypes, unusable: [{ typeId: 'ins12', serial: 'I12-002', status: 'quarantined' }] });
    const doc = parse(svg);
    expect(doc.querySelector('parsererror')).toBeNull();
    expect(doc.documentElement.tagName.toLowerCase()).toBe('svg');

    const rects = sectionRects(doc);
    expect(rects.map((r) => r.lengthM)).toEqual([8, 12, 12, 3, 7]);
    // Every section's width divided by its length gives the same pixels per metre.
    const perMetre = rects.map((r) => r.widthPx / r.lengthM);
    for (const s of perMetre) expect(s).toBeCloseTo(perMetre[0], 1);
    // And the whole boom spans the drawing between its 24-unit margins: (960 − 48) / 42 m.
    expect(perMetre[0]).toBeCloseTo(912 / 42, 1);
    const xs = [...doc.querySelectorAll('rect[data-position]')].map((r) => Number(r.getAttribute('x')));
    expect(xs).toEqual([...xs].sort((a, b) => a - b));
  });

  it('writes the sections’ total weight rounded up to 0.01 t, as the configuration sheet and the fleet screen do', () => {
    // 13,838 kg is 13.838 t: shown rounded up to 13.84 t (to the nearest 0.1 t it read 13.8 t, under the weight).
    const makeup = { ...boomMakeup(crane, 42, kit()), totalSectionWeightKg: 13838 };
    const texts = [...parse(boomMakeupSvg(makeup)).querySelectorAll('text')].map((t) => t.textContent ?? '');
    expect(texts.some((t) => t.includes(' · sections 13.84 t'))).toBe(true);
  });

  it('labels each section with its type and serial, escapes text, and names the quarantined position in words', () => {
    const makeup = boomMakeup(crane, 42, kit());
    const svg = boomMakeupSvg(makeup, { sectionTypes: crane.sectionTypes, unusable: [{ typeId: 'ins12', serial: 'I12-002', status: 'quarantined' }] });
    expect(svg).not.toContain('I12-<7>');
    expect(svg).toContain('I12-&lt;7&gt;&amp;&quot;x&quot;');
    const doc = parse(svg);
    const texts = [...doc.querySelectorAll('text')].map((t) => t.textContent);
    expect(texts).toContain('Base 8 m');
    expect(texts.filter((t) => t === 'Insert 12 m')).toHaveLength(2);
    expect(texts).toContain('Insert 3 m');
    expect(texts).toContain('Tip 7 m');
    expect(texts).toContain('B-801');
    expect(texts).toContain('I12-<7>&"x"');
    expect(texts).toContain('QUARANTINED');
    expect(texts).toContain('I12-002');
    expect(texts).toContain('4 pins');
    expect(texts.some((t) => t?.startsWith('Total length 42 m'))).toBe(true);
    expect(texts).toContain('NOT BUILDABLE from the parts at hand');
    expect(texts).toContain('0 m');
    expect(texts).toContain('42 m');
  });

  it('marks a position with no part at hand as missing with "no serial"', () => {
    const makeup = boomMakeup(crane, 42, kit().filter((i) => i.typeId !== 'ins3'));
    const texts = [...parse(boomMakeupSvg(makeup)).querySelectorAll('text')].map((t) => t.textContent);
    expect(texts).toContain('MISSING');
    expect(texts).toContain('no serial');
    // Without the section types the joints carry no guessed pin count.
    expect(texts).not.toContain('4 pins');
  });

  it('draws a model arrangement from its section types without any serial line', () => {
    const arrangement = crane.arrangements.find((a) => a.boomLengthM === 90)!;
    const types = arrangement.sectionTypeIds.map((id) => crane.sectionTypes.find((t) => t.id === id)!);
    for (const theme of ['day', 'night'] as const) {
      const svg = boomMakeupSvg(types, { theme });
      expect(svg).not.toMatch(/NaN|undefined|Infinity/);
      const doc = parse(svg);
      expect(doc.querySelector('parsererror')).toBeNull();
      const rects = sectionRects(doc);
      expect(rects).toHaveLength(9);
      expect(rects.reduce((sum, r) => sum + r.widthPx, 0)).toBeCloseTo(912, 0);
      const texts = [...doc.querySelectorAll('text')].map((t) => t.textContent);
      expect(texts).not.toContain('no serial');
      expect(texts.filter((t) => t === '4 pins')).toHaveLength(8);
    }
    expect(boomMakeupSvg(types, { theme: 'day' })).toContain('fill="#ffffff"');
    expect(boomMakeupSvg(types, { theme: 'night' })).not.toContain('fill="#ffffff"');
  });

  it('has no NaN for any listed length, and refuses a section without a usable length', () => {
    for (const a of crane.arrangements) {
      const svg = boomMakeupSvg(boomMakeup(crane, a.boomLengthM, kit()), { sectionTypes: crane.sectionTypes });
      expect(svg, `${a.boomLengthM} m`).not.toMatch(/NaN|undefined|Infinity/);
      expect(parse(svg).querySelector('parsererror')).toBeNull();
    }
    expect(() => boomMakeupSvg([{ id: 'base', role: 'base', lengthM: Number.NaN }])).toThrow(/lengthM/);
    expect(boomMakeupSvg([])).toContain('No sections to draw');
  });

  it('the well-formedness check itself catches a raw < and an unclosed tag', () => {
    expect(parse('<svg xmlns="http://www.w3.org/2000/svg"><text>a<b</text></svg>').querySelector('parsererror')).not.toBeNull();
    expect(parse('<svg xmlns="http://www.w3.org/2000/svg"><g></svg>').querySelector('parsererror')).not.toBeNull();
  });

  it('escapes the five XML characters', () => {
    expect(escapeXml(`<a href="x">Tom's & co</a>`)).toBe('&lt;a href=&quot;x&quot;&gt;Tom&apos;s &amp; co&lt;/a&gt;');
  });
});
