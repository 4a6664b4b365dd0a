import type { ArrangementData } from '../schemas/arrangement.js';
import type { ComponentKind } from '../schemas/fleet.js';

const roleWords = { base: 'Base', insert: 'Insert', tip: 'Tip' } as const;

/** Words for a component type from the model's arrangement data, or null when the data has no such type. */
export function componentTypeLabel(arrangement: ArrangementData, kind: ComponentKind, typeId: string): string | null {
  switch (kind) {
    case 'section': {
      const t = arrangement.sectionTypes.find((s) => s.id === typeId);
      return t ? `${roleWords[t.role]} ${t.lengthM} m` : null;
    }
    case 'guy_line': {
      const line = arrangement.arrangements.flatMap((a) => a.guyLines).find((g) => g.mark === typeId);
      return line ? `Guy line ${line.mark} (${line.lengthM} m)` : null;
    }
    case 'hook_block': {
      const b = arrangement.hookBlocks.find((h) => h.id === typeId);
      return b ? (b.sheaveCount === 0 ? `Overhaul ball ${b.id} (${b.ratedLoadT} t)` : `Hook block ${b.id} (${b.ratedLoadT} t, ${b.sheaveCount} sheaves)`) : null;
    }
    case 'rope': {
      const r = arrangement.ropes.find((x) => x.id === typeId);
      return r ? `Wire rope ${r.id} (${r.diameterMm} mm ${r.construction})` : null;
    }
  }
}
