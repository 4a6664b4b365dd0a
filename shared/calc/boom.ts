/**
 * Boom make-up: which sections go where for a boom length, which serial fills each position,
 * the guy lines and the pin count, or why the boom cannot be built from the parts at hand.
 *
 * Only lengths the arrangement data lists are ever assembled. Guy lines are inventory-checked by
 * mark, like sections by type: a missing or quarantined line stops the build as surely as a
 * missing insert. Only serviceable parts are used; quarantined and retired ones never are.
 */
import type { ArrangementData, BoomArrangement, InventoryItem } from '../schemas/arrangement';
import { inventoryItemSchema } from '../schemas/arrangement';
import { CalcInputError, requireFinite, requirePositive } from './errors';

export { inventoryItemSchema };
export type { InventoryItem };

/** One position of the boom, foot to tip. */
export interface BoomPosition {
  /** 1 at the boom foot. */
  position: number;
  typeId: string;
  lengthM: number;
  weightKg: number;
  /** Distance of the section's foot end from the boom foot. */
  startM: number;
  /** Distance of the section's head end from the boom foot. */
  endM: number;
  /** Centre of gravity measured from the boom foot. */
  cogFromBoomFootM: number;
  /** Serviceable serial picked for this position; null when none is at hand. */
  serial: string | null;
}

/** A guy-line entry with the serials picked for it. */
export interface BoomGuyLine {
  mark: string;
  lengthM: number;
  quantity: number;
  pinsEach: number;
  serials: string[];
}

/** The make-up of a boom length. */
export interface BoomMakeup {
  boomLengthM: number;
  /** True when the length is listed and every part is at hand and serviceable. */
  buildable: boolean;
  /** Why it cannot be built; empty when buildable. */
  reasons: string[];
  sections: BoomPosition[];
  guyLines: BoomGuyLine[];
  totalSectionWeightKg: number;
  totalGuyLineCount: number;
  pinCount: { jointPins: number; guyLinePins: number; total: number };
  /** Raising set-up and wind limits copied from the data for this length; null when not listed. */
  arrangement: BoomArrangement | null;
  platesRequired: boolean;
  auxSheaveAllowed: boolean;
  rule: string;
}

const MAKEUP_RULE =
  'sections in the order of the arrangement data, foot to tip; pins = Σ pins per joint over the joints between sections + Σ guy-line pins; serviceable parts only (manufacturer arrangement data)';

function sameLength(a: number, b: number): boolean {
  return Math.abs(a - b) <= 0.001;
}

/** Allocates serviceable serials of each type in inventory order; never the same serial twice. */
function allocator(inventory: readonly InventoryItem[], kind: InventoryItem['kind']) {
  const used = new Set<string>();
  return {
    take(typeId: string): string | null {
      const item = inventory.find((i) => i.kind === kind && i.typeId === typeId && i.status === 'serviceable' && !used.has(i.serial));
      if (!item) return null;
      used.add(item.serial);
      return item.serial;
    },
    unusable(typeId: string): { quarantined: string[]; retired: string[] } {
      const of = (status: InventoryItem['status']) =>
        inventory.filter((i) => i.kind === kind && i.typeId === typeId && i.status === status).map((i) => i.serial);
      return { quarantined: of('quarantined'), retired: of('retired') };
    },
  };
}

function checkInventory(inventory: readonly InventoryItem[]): void {
  if (!Array.isArray(inventory)) throw new CalcInputError('inventory', 'must be a list of inventory items');
  const seen = new Set<string>();
  inventory.forEach((item, i) => {
    const parsed = inventoryItemSchema.safeParse(item);
    if (!parsed.success) throw new CalcInputError(`inventory.${i}`, parsed.error.issues[0]?.message ?? 'invalid item');
    if (seen.has(item.serial)) throw new CalcInputError(`inventory.${i}.serial`, `serial ${item.serial} appears twice`);
    seen.add(item.serial);
  });
}

function shortageReason(what: string, typeId: string, needed: number, found: number, unusable: { quarantined: string[]; retired: string[] }): string {
  const parts = [`${what} "${typeId}": needs ${needed}, ${found} serviceable at hand`];
  if (unusable.quarantined.length > 0) parts.push(`quarantined: ${unusable.quarantined.join(', ')}`);
  if (unusable.retired.length > 0) parts.push(`retired: ${unusable.retired.join(', ')}`);
  return parts.join('; ');
}

/** Plates go under the crawler ends from the threshold boom length up. */
export function platesRequired(boomLengthM: number, thresholdM: number): { required: boolean; rule: string } {
  const length = requirePositive('boomLengthM', boomLengthM);
  const threshold = requirePositive('thresholdM', thresholdM);
  return {
    required: length >= threshold - 0.001,
    rule: `plates required when boom length ≥ ${threshold} m (manufacturer arrangement data)`,
  };
}

/** Ordered sections, guy lines, pin count and serials for a boom length, or why it cannot be built. */
export function boomMakeup(arrangement: ArrangementData, boomLengthM: number, inventory: readonly InventoryItem[]): BoomMakeup {
  requireFinite('boomLengthM', boomLengthM);
  requirePositive('boomLengthM', boomLengthM);
  if (!arrangement || !Array.isArray(arrangement.arrangements)) {
    throw new CalcInputError('arrangement', 'must be crane arrangement data');
  }
  checkInventory(inventory);
  const listed = arrangement.arrangements.find((a) => sameLength(a.boomLengthM, boomLengthM));
  const empty: BoomMakeup = {
    boomLengthM,
    buildable: false,
    reasons: [],
    sections: [],
    guyLines: [],
    totalSectionWeightKg: 0,
    totalGuyLineCount: 0,
    pinCount: { jointPins: 0, guyLinePins: 0, total: 0 },
    arrangement: null,
    platesRequired: false,
    auxSheaveAllowed: false,
    rule: MAKEUP_RULE,
  };
  if (!listed) {
    const allowed = arrangement.arrangements.map((a) => a.boomLengthM).sort((a, b) => a - b);
    return {
      ...empty,
      reasons: [`${boomLengthM} m is not a boom length the arrangement data lists (allowed: ${allowed.join(', ')} m)`],
    };
  }

  const types = new Map(arrangement.sectionTypes.map((t) => [t.id, t]));
  const reasons: string[] = [];
  const sectionSerials = allocator(inventory, 'section');
  const sections: BoomPosition[] = [];
  let startM = 0;
  for (const [index, typeId] of listed.sectionTypeIds.entries()) {
    const type = types.get(typeId);
    if (!type) {
      reasons.push(`position ${index + 1}: section type "${typeId}" is not in the arrangement data`);
      continue;
    }
    sections.push({
      position: index + 1,
      typeId,
      lengthM: type.lengthM,
      weightKg: type.weightKg,
      startM,
      endM: startM + type.lengthM,
      cogFromBoomFootM: startM + type.cogFromFootM,
      serial: sectionSerials.take(typeId),
    });
    startM += type.lengthM;
  }
  if (reasons.length === 0 && !sameLength(startM, listed.boomLengthM)) {
    reasons.push(`the sections add up to ${startM} m, not ${listed.boomLengthM} m: the arrangement data is inconsistent`);
  }
  for (const typeId of new Set(sections.map((s) => s.typeId))) {
    const positions = sections.filter((s) => s.typeId === typeId);
    const missing = positions.filter((s) => s.serial === null);
    if (missing.length > 0) {
      reasons.push(
        shortageReason('section', typeId, positions.length, positions.length - missing.length, sectionSerials.unusable(typeId)),
      );
    }
  }

  const guySerials = allocator(inventory, 'guy_line');
  const guyLines: BoomGuyLine[] = listed.guyLines.map((g) => {
    const serials: string[] = [];
    for (let i = 0; i < g.quantity; i += 1) {
      const s = guySerials.take(g.mark);
      if (s !== null) serials.push(s);
    }
    if (serials.length < g.quantity) {
      reasons.push(shortageReason('guy line', g.mark, g.quantity, serials.length, guySerials.unusable(g.mark)));
    }
    return { mark: g.mark, lengthM: g.lengthM, quantity: g.quantity, pinsEach: g.pinsEach, serials };
  });

  // Each joint's pins are those of the section above it; the foot pins to the upper works are not a boom joint.
  const jointPins = sections.slice(1).reduce((sum, s) => sum + (types.get(s.typeId)?.pinsPerJoint ?? 0), 0);
  const guyLinePins = listed.guyLines.reduce((sum, g) => sum + g.quantity * g.pinsEach, 0);
  return {
    boomLengthM: listed.boomLengthM,
    buildable: reasons.length === 0,
    reasons,
    sections,
    guyLines,
    totalSectionWeightKg: sections.reduce((sum, s) => sum + s.weightKg, 0),
    totalGuyLineCount: listed.guyLines.reduce((sum, g) => sum + g.quantity, 0),
    pinCount: { jointPins, guyLinePins, total: jointPins + guyLinePins },
    arrangement: listed,
    platesRequired: platesRequired(listed.boomLengthM, arrangement.platesThresholdBoomLengthM).required,
    auxSheaveAllowed: arrangement.auxSheaveBoomLengthsM.some((l) => sameLength(l, listed.boomLengthM)),
    rule: MAKEUP_RULE,
  };
}

/** The listed boom lengths that can be built from the serviceable parts at hand, shortest first. */
export function achievableBoomLengths(arrangement: ArrangementData, inventory: readonly InventoryItem[]): {
  boomLengthsM: number[];
  rule: string;
} {
  if (!arrangement || !Array.isArray(arrangement.arrangements)) {
    throw new CalcInputError('arrangement', 'must be crane arrangement data');
  }
  const lengths = arrangement.arrangements
    .map((a) => a.boomLengthM)
    .filter((l) => boomMakeup(arrangement, l, inventory).buildable)
    .sort((a, b) => a - b);
  return { boomLengthsM: lengths, rule: `listed lengths whose make-up is buildable; ${MAKEUP_RULE}` };
}
