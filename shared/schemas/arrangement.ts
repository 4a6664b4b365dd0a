/**
 * The arrangement data of a crane model: the one description of a crane used by the
 * calculations, the fleet import and the planner. Units are in every field name. The data always
 * comes from the crane's manufacturer; Holdline only checks it is complete and self-consistent.
 */
import { z } from 'zod';

const id = z.string().trim().min(1).max(64);
const positive = z.number().finite().positive();
const nonNegative = z.number().finite().nonnegative();
const lengthTolerance = 0.001; // 1 mm: sums of section lengths are compared at this tolerance

/** A boom section type (base, insert, tip). */
export const sectionTypeSchema = z.object({
  /** Stable id used by arrangements and by the inventory's typeId, e.g. "ins6". */
  id,
  /** What the section is. */
  role: z.enum(['base', 'insert', 'tip']),
  /** Pin-to-pin length. */
  lengthM: positive,
  weightKg: positive,
  /** Centre of gravity measured from the section's foot end, for the assist-crane lift. */
  cogFromFootM: nonNegative,
  /** Connecting pins in the joint at this section's foot (the joint with the section below). */
  pinsPerJoint: z.number().int().min(1).max(16),
  /** How to recognise the face that goes up when the section is laid on timber. */
  topFace: z.string().trim().min(1).max(200),
}).refine((s) => s.cogFromFootM <= s.lengthM, { message: 'centre of gravity lies outside the section', path: ['cogFromFootM'] });

/** One guy-line (pendant) entry of a set: a mark and how many lines of it. */
export const guyLineSchema = z.object({
  /** The mark stamped on the line's connectors; the inventory's typeId for guy lines. */
  mark: id,
  lengthM: positive,
  /** Lines of this mark in the set (left and right count separately). */
  quantity: z.number().int().min(1).max(64),
  /** Connecting pins each line of this mark brings. */
  pinsEach: z.number().int().min(0).max(8),
  /** Weight of one line of this mark; null when the data does not give it (shown as "not included"). */
  weightKg: positive.max(20_000).nullable(),
});

/** A wind limit as gust and mean speed. */
export const windLimitSchema = z.object({
  gustMs: positive.max(60),
  meanMs: positive.max(60),
}).refine((w) => w.gustMs >= w.meanMs, { message: 'gust limit is lower than the mean limit', path: ['gustMs'] });

/** One row of a rated capacity chart. */
export const capacityPointSchema = z.object({
  radiusM: positive.max(300),
  capacityT: nonNegative.max(5_000),
});

/** Rows of a chart: radii rising, capacity never rising with radius. */
function chartRowsInOrder(points: readonly { radiusM: number; capacityT: number }[], ctx: z.RefinementCtx): void {
  points.forEach((p, i) => {
    if (i === 0) return;
    const prev = points[i - 1];
    if (p.radiusM <= prev.radiusM) ctx.addIssue({ code: 'custom', message: 'radii must increase down the chart', path: ['points', i, 'radiusM'] });
    if (p.capacityT > prev.capacityT) ctx.addIssue({ code: 'custom', message: 'capacity must not rise with radius', path: ['points', i, 'capacityT'] });
  });
}

/**
 * The crane's own rated capacity chart for one boom length and counterweight, as the manufacturer
 * publishes it. Read at the next longer listed radius, never between or beyond its rows.
 */
export const capacityChartSchema = z
  .object({
    counterweightKg: nonNegative,
    /** What the chart covers, in the manufacturer's words (e.g. "360°, crawlers extended"). */
    description: z.string().trim().min(1).max(200),
    points: z.array(capacityPointSchema).min(1).max(200),
  })
  .superRefine((chart, ctx) => chartRowsInOrder(chart.points, ctx));

/** The arrangement for one allowed boom length. */
export const boomArrangementSchema = z.object({
  boomLengthM: positive,
  /** Section type ids ordered from the boom foot to the tip. */
  sectionTypeIds: z.array(id).min(2),
  guyLines: z.array(guyLineSchema).min(1),
  /** Set-up required before raising the boom. */
  raising: z.object({
    counterweightKg: nonNegative,
    trackGaugeM: positive,
    /** Limits that apply while raising this boom length. */
    limits: z.object({
      maxGroundSlopePercent: positive,
      maxBoomHoistLinePullKn: positive,
      /** The tip must be carried (assist crane or tip dolly) while the boom leaves the ground. */
      tipSupportRequired: z.boolean(),
      /**
       * The most that may hang at the tip (hook blocks, overhaul ball, auxiliary sheave) while the
       * boom is raised from the ground without help; null when the data does not give it.
       */
      maxTipLoadKg: positive.max(100_000).nullable(),
    }),
  }),
  /** Rated capacity charts for this boom length, one per counterweight; empty when the data has none. */
  capacityCharts: z.array(capacityChartSchema).max(20),
  wind: z.object({
    assembly: windLimitSchema,
    raising: windLimitSchema,
  }),
});

/** A hook block or overhaul ball. */
export const hookBlockSchema = z.object({
  id,
  ratedLoadT: positive,
  /** 0 for an overhaul ball. */
  sheaveCount: z.number().int().min(0).max(20),
  /** Pitch diameter of the block's sheaves; null for an overhaul ball. */
  sheavePitchDiameterMm: positive.nullable(),
  weightKg: positive,
  /** Most parts of line the block can be reeved with. */
  maxParts: z.number().int().min(1).max(40),
  /**
   * Bearings of the block's sheaves; null for an overhaul ball or when the data does not say
   * (the planner then takes plain bearings, the higher line pull).
   */
  sheaveBearing: z.enum(['plain', 'rolling']).nullable().default(null),
}).refine((b) => (b.sheaveCount === 0) === (b.sheavePitchDiameterMm === null), {
  message: 'a block with sheaves needs their diameter; an overhaul ball has none',
  path: ['sheavePitchDiameterMm'],
});

/** A wire rope type. */
export const ropeSchema = z.object({
  id,
  diameterMm: positive,
  /** Construction class as the rope certificate gives it, e.g. "6x36WS-IWRC". */
  construction: z.string().trim().min(1).max(80),
  gradeNpmm2: positive,
  /** From the rope certificate. */
  minimumBreakingForceKn: positive,
  rotationResistant: z.boolean(),
  /** Mass per metre from the rope certificate; null when the data does not give it. */
  massKgPerM: positive.max(100).nullable(),
});

/** A winch drum. */
export const drumSchema = z.object({
  id,
  role: z.enum(['mainHoist', 'auxiliaryHoist', 'boomHoist']),
  ropeId: id,
  /** First-layer pitch diameter. */
  pitchDiameterMm: positive,
  /** Width between flanges, for the fleet angle. */
  widthM: positive,
  /** Rope installed on the drum. */
  ropeLengthM: positive,
  /** Rope run from the drum to the boom foot (first sheave); null when the data does not give it. */
  leadToBoomFootM: positive.max(100).nullable(),
  permissibleLinePullKn: positive,
  /** Grooved drum (fleet angle up to 2°) or smooth (1½°); null when the data does not say (taken as smooth). */
  grooved: z.boolean().nullable().default(null),
  /**
   * The first sheave the rope runs to from the drum, for the fleet angle: its distance from the
   * drum and how far its centre line sits to one side of the drum's centre. Null when the data does
   * not give it (the fleet angle is then the manufacturer's, not checked).
   */
  firstSheave: z.object({ distanceM: positive.max(100), offsetFromDrumCentreM: nonNegative.max(10) }).nullable().default(null),
});

/** A sheave on the boom or mast. */
export const sheaveSchema = z.object({
  id,
  location: z.string().trim().min(1).max(120),
  role: z.enum(['load', 'boomHoist', 'idler']),
  pitchDiameterMm: positive,
  bearing: z.enum(['plain', 'rolling']),
  /**
   * The hoists whose rope runs over this sheave. Null when the data does not say: the planner then
   * counts a load or idler sheave in the path of both the main and the auxiliary hoist (more
   * friction, the higher line pull) and a boom-hoist sheave in the boom hoist's.
   */
  hoists: z.array(z.enum(['mainHoist', 'auxiliaryHoist', 'boomHoist'])).min(1).max(3).nullable().default(null),
});

/** Crawler tracks. */
export const tracksSchema = z.object({
  count: z.number().int().min(2).max(4),
  /** Bearing length of each track (tumbler to idler centres). */
  lengthM: positive,
  shoeWidthM: positive,
  /** Gauges (centre to centre) the carbody can be set to. */
  gaugeOptionsM: z.array(positive).min(1),
});

/** Machine weight and centres of gravity, without boom. */
export const machineSchema = z.object({
  /** Crawlers, carbody and upper works without counterweight and boom. */
  baseWeightKg: positive,
  /** Horizontal distance of the base CoG from the slewing centre, positive towards the boom. */
  cogFromSlewCentreM: z.number().finite(),
  cogHeightM: nonNegative,
  counterweight: z.object({
    /** Blocks in the order they are fitted. */
    blocks: z.array(z.object({ id, weightKg: positive })).min(1),
    /** Horizontal CoG of the counterweight, negative = behind the slewing centre. */
    cogFromSlewCentreM: z.number().finite(),
  }),
  /**
   * Where the boom foot pin sits: horizontally ahead of the slewing centre (towards the boom) and
   * above the ground. Null when the data does not give it.
   */
  boomFoot: z.object({ aheadOfSlewCentreM: z.number().finite().min(-10).max(20), heightM: nonNegative.max(30) }).nullable(),
  /** The mast or gantry as it stands for raising and working; null when the data does not give it. */
  mast: z.object({ weightKg: positive.max(200_000), cogFromSlewCentreM: z.number().finite().min(-30).max(30) }).nullable(),
});

function duplicates(values: readonly string[]): string[] {
  const seen = new Set<string>();
  const dup = new Set<string>();
  for (const v of values) (seen.has(v) ? dup : seen).add(v);
  return [...dup];
}

/**
 * Brings arrangement data written before version 2 up to it: every value that version 1 did not
 * have becomes null (the planner shows "not included", never zero) and charts become empty.
 * Anything that is not a version-1 object passes through untouched for the schema to judge.
 */
export function upgradeArrangementData(input: unknown): unknown {
  if (typeof input !== 'object' || input === null || (input as { schemaVersion?: unknown }).schemaVersion !== 1) return input;
  const v1 = input as Record<string, unknown>;
  const list = (v: unknown): Record<string, unknown>[] => (Array.isArray(v) ? (v as Record<string, unknown>[]) : []);
  const obj = (v: unknown): Record<string, unknown> => (typeof v === 'object' && v !== null ? (v as Record<string, unknown>) : {});
  return {
    ...v1,
    schemaVersion: 2,
    arrangements: list(v1.arrangements).map((a) => {
      const raising = obj(a.raising);
      return {
        ...a,
        guyLines: list(a.guyLines).map((g) => ({ weightKg: null, ...g })),
        raising: { ...raising, limits: { maxTipLoadKg: null, ...obj(raising.limits) } },
        capacityCharts: [],
      };
    }),
    drums: list(v1.drums).map((d) => ({ leadToBoomFootM: null, grooved: null, firstSheave: null, ...d })),
    sheaves: list(v1.sheaves).map((s) => ({ hoists: null, ...s })),
    hookBlocks: list(v1.hookBlocks).map((b) => ({ sheaveBearing: null, ...b })),
    ropes: list(v1.ropes).map((r) => ({ massKgPerM: null, ...r })),
    machine: { boomFoot: null, mast: null, ...obj(v1.machine) },
    auxSheave: null,
  };
}

/** The whole arrangement data of a crane model. */
const arrangementDataV2Schema = z
  .object({
    schemaVersion: z.literal(2),
    id,
    manufacturer: z.string().trim().min(1).max(120),
    model: z.string().trim().min(1).max(120),
    sectionTypes: z.array(sectionTypeSchema).min(2),
    arrangements: z.array(boomArrangementSchema).min(1),
    hookBlocks: z.array(hookBlockSchema).min(1),
    drums: z.array(drumSchema).min(1),
    sheaves: z.array(sheaveSchema).min(1),
    ropes: z.array(ropeSchema).min(1),
    tracks: tracksSchema,
    machine: machineSchema,
    /** From this boom length up, steel plates go under the crawler ends. */
    platesThresholdBoomLengthM: positive,
    /** Boom lengths that take the auxiliary sheave. */
    auxSheaveBoomLengthsM: z.array(positive),
    /** The auxiliary sheave head: its weight and how far it reaches beyond the main tip; null when the data does not give it. */
    auxSheave: z.object({ weightKg: positive.max(50_000), reachBeyondTipM: nonNegative.max(20) }).nullable(),
  })
  .superRefine((data, ctx) => {
    const types = new Map(data.sectionTypes.map((t) => [t.id, t]));
    for (const d of duplicates(data.sectionTypes.map((t) => t.id))) {
      ctx.addIssue({ code: 'custom', message: `section type id "${d}" is used twice`, path: ['sectionTypes'] });
    }
    const lengths = data.arrangements.map((a) => String(a.boomLengthM));
    for (const d of duplicates(lengths)) {
      ctx.addIssue({ code: 'custom', message: `boom length ${d} m is listed twice`, path: ['arrangements'] });
    }
    const ropeIds = new Set(data.ropes.map((r) => r.id));
    data.drums.forEach((drum, i) => {
      if (!ropeIds.has(drum.ropeId)) {
        ctx.addIssue({ code: 'custom', message: `unknown rope "${drum.ropeId}"`, path: ['drums', i, 'ropeId'] });
      }
    });
    const cwPrefixSums: number[] = [0];
    for (const b of data.machine.counterweight.blocks) cwPrefixSums.push(cwPrefixSums[cwPrefixSums.length - 1] + b.weightKg);
    const guyLengthByMark = new Map<string, number>();
    data.arrangements.forEach((a, i) => {
      let sumM = 0;
      a.sectionTypeIds.forEach((typeId, j) => {
        const t = types.get(typeId);
        if (!t) {
          ctx.addIssue({ code: 'custom', message: `unknown section type "${typeId}"`, path: ['arrangements', i, 'sectionTypeIds', j] });
          return;
        }
        sumM += t.lengthM;
        const last = a.sectionTypeIds.length - 1;
        const expected = j === 0 ? 'base' : j === last ? 'tip' : 'insert';
        if (t.role !== expected) {
          ctx.addIssue({
            code: 'custom',
            message: `position ${j + 1} must be a ${expected}, "${typeId}" is a ${t.role}`,
            path: ['arrangements', i, 'sectionTypeIds', j],
          });
        }
      });
      if (Math.abs(sumM - a.boomLengthM) > lengthTolerance && a.sectionTypeIds.every((tid) => types.has(tid))) {
        ctx.addIssue({
          code: 'custom',
          message: `sections add up to ${sumM} m, not ${a.boomLengthM} m`,
          path: ['arrangements', i, 'sectionTypeIds'],
        });
      }
      if (!data.tracks.gaugeOptionsM.some((g) => Math.abs(g - a.raising.trackGaugeM) <= lengthTolerance)) {
        ctx.addIssue({
          code: 'custom',
          message: `track gauge ${a.raising.trackGaugeM} m is not one of the gauge options`,
          path: ['arrangements', i, 'raising', 'trackGaugeM'],
        });
      }
      // Counterweight goes on block by block in the stated order, so only those sums are possible.
      if (!cwPrefixSums.some((s) => Math.abs(s - a.raising.counterweightKg) < 0.5)) {
        ctx.addIssue({
          code: 'custom',
          message: `counterweight ${a.raising.counterweightKg} kg cannot be made from the blocks in their fitting order`,
          path: ['arrangements', i, 'raising', 'counterweightKg'],
        });
      }
      a.guyLines.forEach((g, k) => {
        const known = guyLengthByMark.get(g.mark);
        if (known !== undefined && Math.abs(known - g.lengthM) > lengthTolerance) {
          ctx.addIssue({
            code: 'custom',
            message: `guy-line mark "${g.mark}" has length ${g.lengthM} m here but ${known} m elsewhere`,
            path: ['arrangements', i, 'guyLines', k, 'lengthM'],
          });
        } else if (known === undefined) {
          guyLengthByMark.set(g.mark, g.lengthM);
        }
      });
      for (const d of duplicates(a.guyLines.map((g) => g.mark))) {
        ctx.addIssue({ code: 'custom', message: `guy-line mark "${d}" is listed twice`, path: ['arrangements', i, 'guyLines'] });
      }
      for (const d of duplicates(a.capacityCharts.map((c) => String(c.counterweightKg)))) {
        ctx.addIssue({ code: 'custom', message: `two capacity charts for ${d} kg of counterweight`, path: ['arrangements', i, 'capacityCharts'] });
      }
    });
    const listed = new Set(lengths);
    data.auxSheaveBoomLengthsM.forEach((l, i) => {
      if (!listed.has(String(l))) {
        ctx.addIssue({ code: 'custom', message: `aux-sheave length ${l} m is not an allowed boom length`, path: ['auxSheaveBoomLengthsM', i] });
      }
    });
  });

/** The whole arrangement data of a crane model; version 1 files are upgraded on the way in. */
export const arrangementDataSchema = z.preprocess(upgradeArrangementData, arrangementDataV2Schema);

/** A section type. */
export type SectionType = z.infer<typeof sectionTypeSchema>;
/** A gust and mean wind limit. */
export type WindLimit = z.infer<typeof windLimitSchema>;
/** The arrangement for one boom length. */
export type BoomArrangement = z.infer<typeof boomArrangementSchema>;
/** A hook block or overhaul ball. */
export type HookBlock = z.infer<typeof hookBlockSchema>;
/** One rated capacity chart of the crane. */
export type CapacityChart = z.infer<typeof capacityChartSchema>;
/** A rope type. */
export type Rope = z.infer<typeof ropeSchema>;
/** A winch drum. */
export type Drum = z.infer<typeof drumSchema>;
/** A sheave. */
export type Sheave = z.infer<typeof sheaveSchema>;
/** The whole arrangement data of a crane model. */
export type ArrangementData = z.infer<typeof arrangementDataSchema>;

/** One radius/capacity point of an assist-crane chart. */
export const assistChartPointSchema = z.object({
  radiusM: positive,
  capacityT: nonNegative,
});

/** One configuration of an assist crane's capacity chart. */
export const assistChartSchema = z
  .object({
    id,
    /** Boom, counterweight and outrigger set-up this chart is for. */
    description: z.string().trim().min(1).max(200),
    boomLengthM: positive,
    counterweightKg: nonNegative,
    points: z.array(assistChartPointSchema).min(1),
  })
  .superRefine((chart, ctx) => chartRowsInOrder(chart.points, ctx));

/** An assist crane with its charts, one per configuration. */
export const assistCraneSchema = z.object({
  schemaVersion: z.literal(1),
  id,
  manufacturer: z.string().trim().min(1).max(120),
  model: z.string().trim().min(1).max(120),
  charts: z.array(assistChartSchema).min(1),
});

/** One configuration's chart. */
export type AssistChart = z.infer<typeof assistChartSchema>;
/** An assist crane with its charts. */
export type AssistCrane = z.infer<typeof assistCraneSchema>;

/**
 * A physical part in the fleet, by serial. Guy lines are inventory items too, their typeId being
 * the mark stamped on them, so a boom is only buildable when every line of its set is at hand.
 */
export const inventoryItemSchema = z.object({
  serial: z.string().trim().min(1).max(64),
  kind: z.enum(['section', 'guy_line', 'hook_block', 'rope']),
  /** A section type id, a guy-line mark, a hook block id or a rope id from the arrangement data. */
  typeId: id,
  status: z.enum(['serviceable', 'quarantined', 'retired']),
});

/** A physical part in the fleet. */
export type InventoryItem = z.infer<typeof inventoryItemSchema>;
