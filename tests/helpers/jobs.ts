import type { Configuration } from '../../shared/schemas/configuration.js';

/** A complete configuration for the demo model's 18 m boom that a unit with the 18 m kit can build. */
export function configuration18m(craneUnitId: string, overrides: Partial<Configuration> = {}): Configuration {
  return {
    craneUnitId,
    boomLengthM: 18,
    mainHook: { hookBlockId: 'HB120', parts: 6 },
    auxiliary: { enabled: false, hookBlockId: null },
    heaviestLoad: { description: 'Transformer core, 20 t', loadT: 20, riggingT: 0.8, radiusM: 8 },
    ground: { groundType: 'medium dense gravel', allowablePressureKpa: 400, source: { kind: 'ground_investigation', reference: 'GI report T-001' } },
    mats: { used: false, lengthM: 5, widthM: 1.2, thicknessM: 0.3, weightKg: 1100 },
    assist: { assistCraneId: null, chartId: null, lifts: [] },
    siteHazards: { powerLines: [], buriedServices: '', neighbours: '' },
    fallZoneMarginM: 5,
    ...overrides,
  };
}
