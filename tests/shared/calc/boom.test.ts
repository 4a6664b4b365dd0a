// Boom make-up is arithmetic over the (invented) demo arrangement data; the expected sums below
// are worked by hand from that data, not taken from any manufacturer.
import { describe, expect, it } from 'vitest';
import { achievableBoomLengths, boomMakeup, inventoryItemSchema, platesRequired } from '../../../shared/calc';
import type { InventoryItem } from '../../../shared/calc';
import { demoCrane, expectCalcError } from '../helpers';

const crane = demoCrane();

function kit(overrides: Partial<Record<string, number>> = {}): InventoryItem[] {
  // A full kit for every listed length: 6 × ins12, 1 × ins6, 1 × ins3, guy lines for 90 m and 84 m.
  const counts: Record<string, number> = { base: 1, ins3: 1, ins6: 1, ins12: 6, tip: 1, ...overrides };
  const guy: Record<string, number> = { GT: 2, G12: 12, G6: 2, G3: 2, GB: 2 };
  const items: InventoryItem[] = [];
  for (const [typeId, n] of Object.entries(counts)) {
    for (let i = 1; i <= n; i += 1) items.push({ serial: `S-${typeId}-${i}`, kind: 'section', typeId, status: 'serviceable' });
  }
  for (const [mark, n] of Object.entries(guy)) {
    for (let i = 1; i <= n; i += 1) items.push({ serial: `L-${mark}-${i}`, kind: 'guy_line', typeId: mark, status: 'serviceable' });
  }
  return items;
}

describe('boomMakeup', () => {
  it('90 m: base, six 12 m inserts, a 3 m insert and the tip, with positions from the foot', () => {
    const m = boomMakeup(crane, 90, kit());
    expect(m.buildable).toBe(true);
    expect(m.reasons).toEqual([]);
    expect(m.sections.map((s) => s.typeId)).toEqual(['base', 'ins12', 'ins12', 'ins12', 'ins12', 'ins12', 'ins12', 'ins3', 'tip']);
    expect(m.sections[0]).toMatchObject({ position: 1, startM: 0, endM: 8, serial: 'S-base-1' });
    expect(m.sections[1]).toMatchObject({ startM: 8, endM: 20 });
    expect(m.sections[8]).toMatchObject({ typeId: 'tip', startM: 83, endM: 90 });
    // 7800 + 6 × 3500 + 1150 + 4100
    expect(m.totalSectionWeightKg).toBe(34050);
    // 8 joints between 9 sections × 4 pins = 32; guy pins GT 2×2 + G12 12×1 + G3 2×1 + GB 2×1 = 20
    expect(m.pinCount).toEqual({ jointPins: 32, guyLinePins: 20, total: 52 });
    expect(m.platesRequired).toBe(true);
    expect(m.auxSheaveAllowed).toBe(false);
    expect(new Set(m.sections.map((s) => s.serial)).size).toBe(9);
    expect(m.arrangement?.raising.counterweightKg).toBe(105000);
  });

  it('a length the data does not list is never assembled, whatever is at hand', () => {
    const m = boomMakeup(crane, 45, kit({ ins12: 20, ins6: 5, ins3: 5 }));
    expect(m.buildable).toBe(false);
    expect(m.sections).toEqual([]);
    expect(m.reasons[0]).toMatch(/45 m is not a boom length the arrangement data lists/);
  });

  it('names the quarantined serial when it leaves a position empty', () => {
    const inv = kit({ ins12: 5 });
    inv.push({ serial: 'S-ins12-Q', kind: 'section', typeId: 'ins12', status: 'quarantined' });
    const m = boomMakeup(crane, 90, inv);
    expect(m.buildable).toBe(false);
    expect(m.reasons.join('\n')).toMatch(/section "ins12": needs 6, 5 serviceable at hand; quarantined: S-ins12-Q/);
    expect(m.sections.filter((s) => s.serial === null)).toHaveLength(1);
  });

  it('prefers serviceable parts and never uses quarantined or retired ones, even when listed first', () => {
    const inv: InventoryItem[] = [
      { serial: 'S-tip-Q', kind: 'section', typeId: 'tip', status: 'quarantined' },
      { serial: 'S-tip-R', kind: 'section', typeId: 'tip', status: 'retired' },
      ...kit(),
    ];
    const m = boomMakeup(crane, 18, inv);
    expect(m.buildable).toBe(true);
    expect(m.sections.at(-1)?.serial).toBe('S-tip-1');
  });

  it('checks guy lines by mark', () => {
    const inv = kit().filter((i) => i.serial !== 'L-GB-2');
    inv.push({ serial: 'L-GB-Q', kind: 'guy_line', typeId: 'GB', status: 'quarantined' });
    const m = boomMakeup(crane, 18, inv);
    expect(m.buildable).toBe(false);
    expect(m.reasons).toEqual(['guy line "GB": needs 2, 1 serviceable at hand; quarantined: L-GB-Q']);
  });

  it('refuses an inventory with a serial twice or an unknown status', () => {
    const inv = kit();
    expectCalcError(() => boomMakeup(crane, 18, [...inv, inv[0]]), `inventory.${inv.length}.serial`);
    const bad = [{ serial: 'X', kind: 'section', typeId: 'base', status: 'lost' }] as unknown as InventoryItem[];
    expectCalcError(() => boomMakeup(crane, 18, bad), 'inventory.0');
    expectCalcError(() => boomMakeup(crane, Number.NaN, inv), 'boomLengthM');
  });
});

describe('achievableBoomLengths', () => {
  it('a full kit builds every listed length', () => {
    expect(achievableBoomLengths(crane, kit()).boomLengthsM).toEqual(crane.arrangements.map((a) => a.boomLengthM).sort((a, b) => a - b));
  });

  it('with only two 12 m inserts serviceable, nothing needing three is offered', () => {
    const lengths = achievableBoomLengths(crane, kit({ ins12: 2 })).boomLengthsM;
    expect(lengths).toEqual([18, 21, 24, 27, 30, 36, 42, 48]);
  });
});

describe('platesRequired', () => {
  it('from the threshold up (66 m in the demo data)', () => {
    expect(platesRequired(60, crane.platesThresholdBoomLengthM).required).toBe(false);
    expect(platesRequired(66, crane.platesThresholdBoomLengthM).required).toBe(true);
  });
});

describe('inventory item schema', () => {
  it('accepts the four kinds and three statuses', () => {
    expect(inventoryItemSchema.safeParse({ serial: 'A1', kind: 'rope', typeId: 'R28-hoist', status: 'retired' }).success).toBe(true);
    expect(inventoryItemSchema.safeParse({ serial: 'A1', kind: 'jib', typeId: 'x', status: 'serviceable' }).success).toBe(false);
  });
});
