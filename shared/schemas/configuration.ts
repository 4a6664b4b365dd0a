import { z } from 'zod';

const positive = z.number().finite().positive();
const nonNegative = z.number().finite().nonnegative();
const label = (max: number) => z.string().trim().max(max);

/** Where the allowable ground pressure comes from. Without a source the ground check is "unverified". */
export const groundSourceKinds = ['ground_investigation', 'temporary_works_design', 'none'] as const;
export const groundSourceLabels: Record<(typeof groundSourceKinds)[number], string> = {
  ground_investigation: 'Ground investigation',
  temporary_works_design: 'Temporary-works design',
  none: 'No source yet',
};

/** An overhead power line near the crane. */
export const powerLineSchema = z.object({
  label: label(120).min(1, 'Name the line'),
  voltageKv: positive.max(1000, 'Above 1,000 kV: get the line owner’s distance'),
  /** Nearest horizontal distance from the crane's slewing centre to the line, as measured on site. */
  distanceM: positive,
});

/**
 * What the supervisor plans for a job. Units are in every name; the server recomputes every figure
 * from this and the crane's arrangement data.
 */
export const configurationSchema = z
  .object({
    craneUnitId: z.uuid('Choose the crane unit'),
    boomLengthM: positive,
    mainHook: z.object({
      hookBlockId: z.string().trim().min(1, 'Choose the main hook block').max(64),
      parts: z.number().int().min(1).max(40),
    }),
    auxiliary: z.object({
      /** The auxiliary sheave and hoist are fitted. */
      enabled: z.boolean(),
      hookBlockId: z.string().trim().max(64).nullable(),
    }),
    heaviestLoad: z.object({
      description: label(200).min(1, 'Say what the heaviest load is'),
      loadT: positive,
      riggingT: nonNegative,
      radiusM: positive,
    }),
    ground: z.object({
      groundType: label(120),
      allowablePressureKpa: positive,
      source: z.object({
        kind: z.enum(groundSourceKinds),
        /** Report or design reference, e.g. "GI report R-1142 rev B". */
        reference: label(200),
      }),
    }),
    mats: z.object({
      used: z.boolean(),
      /** One mat under each track end region: mats are taken as long as needed to span the track width. */
      lengthM: positive,
      widthM: positive,
      thicknessM: positive,
      /** Own weight of one mat. */
      weightKg: nonNegative,
    }),
    assist: z.object({
      assistCraneId: z.uuid().nullable(),
      chartId: z.string().trim().max(64).nullable(),
      /** Each lift the assist crane makes, at the radius it is set up for. */
      lifts: z
        .array(
          z.object({
            label: label(120).min(1, 'Name the lift'),
            liftT: positive,
            riggingT: nonNegative,
            radiusM: positive,
          }),
        )
        .max(60),
    }),
    siteHazards: z.object({
      powerLines: z.array(powerLineSchema).max(20),
      buriedServices: label(2000),
      neighbours: label(2000),
    }),
    /** Added to the boom length for the exclusion zone (common practice, no source; a setting). */
    fallZoneMarginM: nonNegative.max(50),
  })
  .superRefine((c, ctx) => {
    if (c.ground.source.kind !== 'none' && c.ground.source.reference.length === 0) {
      ctx.addIssue({ code: 'custom', message: 'Give the report or design reference', path: ['ground', 'source', 'reference'] });
    }
    if (c.auxiliary.enabled && !c.auxiliary.hookBlockId) {
      ctx.addIssue({ code: 'custom', message: 'Choose the auxiliary hook or overhaul ball', path: ['auxiliary', 'hookBlockId'] });
    }
    if (c.assist.lifts.length > 0 && (!c.assist.assistCraneId || !c.assist.chartId)) {
      ctx.addIssue({ code: 'custom', message: 'Choose the assist crane and its chart for the planned lifts', path: ['assist', 'assistCraneId'] });
    }
  });
export type Configuration = z.infer<typeof configurationSchema>;
export type PowerLine = z.infer<typeof powerLineSchema>;

/**
 * Pass, fail, for information, not checkable yet (e.g. ground without a source), or caution:
 * within the rating but above the site's caution share, so it needs a second person's approval.
 */
export const figureStatuses = ['pass', 'fail', 'info', 'unverified', 'caution'] as const;
export type FigureStatus = (typeof figureStatuses)[number];

/** One computed figure of a configuration, with the rule that produced it. */
export const figureSchema = z.object({
  /** Stable key, e.g. "rope.designFactor", "ground.overEnd.mats", "powerLine.0". */
  key: z.string(),
  group: z.enum(['boom', 'rope', 'assist', 'ground', 'wind', 'site']),
  label: z.string(),
  /** The value in words and units, e.g. "41.2 kN". */
  value: z.string(),
  status: z.enum(figureStatuses),
  /** False for failures that can never be overridden. */
  overridable: z.boolean(),
  rule: z.string(),
  detail: z.string().optional(),
});
export type Figure = z.infer<typeof figureSchema>;
