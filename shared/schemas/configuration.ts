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
export const powerLineSchema = z
  .object({
    label: label(120).min(1, 'Name the line'),
    /** Nominal voltage; null when it is not known (the larger default distance applies). */
    voltageKv: positive.max(1000, 'Above 1,000 kV: get the line owner’s distance').nullable(),
    /** Nearest horizontal distance from the crane's slewing centre to the line, as measured on site. */
    distanceM: positive.max(5000, 'Enter 5,000 m or less: a line farther away is no hazard to the boom'),
    /** The line's owner has confirmed the voltage (needed before Table A distances may be used). */
    voltageConfirmedByOwner: z.boolean().default(false),
    /** Encroachment-prevention measures (marked boundary, spotter, warning line...) are in place for this line. */
    encroachmentPreventionInPlace: z.boolean().default(false),
    /** Nearest horizontal distance from the assist crane's slewing centre to the line; null when not measured. */
    assistDistanceM: positive.max(5000, 'Enter 5,000 m or less: a line farther away is no hazard to the boom').nullable().default(null),
  })
  .superRefine((line, ctx) => {
    if (line.voltageConfirmedByOwner && line.voltageKv === null) {
      ctx.addIssue({ code: 'custom', message: 'Enter the voltage the owner confirmed', path: ['voltageKv'] });
    }
  });

/**
 * What the supervisor plans for a job. Units are in every name; the server recomputes every figure
 * from this and the crane's arrangement data.
 */
export const configurationSchema = z
  .object({
    craneUnitId: z.uuid('Choose the crane unit'),
    boomLengthM: positive.max(300, 'Enter 300 m or less: no listed boom is longer'),
    mainHook: z.object({
      hookBlockId: z.string().trim().min(1, 'Choose the main hook block').max(64),
      parts: z.number().int('Enter a whole number from 1 to 40').min(1, 'Enter a whole number from 1 to 40').max(40, 'Enter a whole number from 1 to 40'),
      /**
       * Height of the lowest hook position above the ground, negative below it (a pit, a shaft, a
       * quay edge): the rope paid out, and so the wraps left on the drum, are worked out from it.
       */
      lowestHookPositionM: z
        .number('Enter the lowest hook position in metres')
        .finite()
        .min(-300, 'Enter no more than 300 m below ground')
        .max(200, 'Enter no more than 200 m above ground')
        .default(0),
    }),
    auxiliary: z.object({
      /** The auxiliary sheave and hoist are fitted. */
      enabled: z.boolean(),
      hookBlockId: z.string().trim().max(64).nullable(),
    }),
    heaviestLoad: z.object({
      description: label(200).min(1, 'Say what the heaviest load is'),
      loadT: positive.max(3000, 'Enter 3,000 t or less'),
      riggingT: nonNegative.max(300, 'Enter 300 t or less'),
      radiusM: positive.max(300, 'Enter 300 m or less'),
    }),
    ground: z.object({
      groundType: label(120),
      allowablePressureKpa: positive.max(5000, 'Enter 5,000 kPa or less: a higher figure is almost certainly a typing error'),
      source: z.object({
        kind: z.enum(groundSourceKinds),
        /** Report or design reference, e.g. "GI report R-1142 rev B". */
        reference: label(200),
        /**
         * Who designed the temporary works (person and firm): required when the allowable pressure
         * comes from a temporary-works design. Older stored configurations have none.
         */
        designer: label(200).default(''),
      }),
    }),
    mats: z.object({
      used: z.boolean(),
      /** One mat under each track end region: mats are taken as long as needed to span the track width. */
      lengthM: positive.max(30, 'Enter 30 m or less'),
      widthM: positive.max(10, 'Enter 10 m or less'),
      thicknessM: positive.max(3, 'Enter 3 m or less'),
      /** Own weight of one mat. */
      weightKg: nonNegative.max(100_000, 'Enter 100,000 kg or less'),
    }),
    assist: z.object({
      assistCraneId: z.uuid().nullable(),
      chartId: z.string().trim().max(64).nullable(),
      /** Each lift the assist crane makes, at the radius it is set up for. */
      lifts: z
        .array(
          z.object({
            label: label(120).min(1, 'Name the lift'),
            liftT: positive.max(1000, 'Enter 1,000 t or less'),
            riggingT: nonNegative.max(100, 'Enter 100 t or less'),
            radiusM: positive.max(200, 'Enter 200 m or less'),
            /** The assist crane's own hook block: its chart counts it as load unless the chart says otherwise. */
            hookBlockT: nonNegative.max(50, 'Enter 50 t or less').default(0),
            slingsT: nonNegative.max(50, 'Enter 50 t or less').default(0),
            shacklesT: nonNegative.max(50, 'Enter 50 t or less').default(0),
            /** Weights the assist crane's chart says to deduct (stowed jib, extension, hoist rope...). */
            deductionsT: nonNegative.max(100, 'Enter 100 t or less').default(0),
            /**
             * Two sling legs from one hook over the centre of gravity: each pick point's horizontal
             * distance to the centre of gravity, the hook's height above the pick points and the
             * rated load of one leg at its angle as the sling's tag gives it (null when not given).
             */
            legs: z
              .object({
                toCogAM: nonNegative.max(100, 'Enter 100 m or less'),
                toCogBM: nonNegative.max(100, 'Enter 100 m or less'),
                hookHeightM: positive.max(100, 'Enter 100 m or less'),
                legRatedLoadT: positive.max(500, 'Enter 500 t or less').nullable(),
              })
              .nullable()
              .default(null),
          }),
        )
        .max(60),
      /**
       * The assist crane's outrigger or track pads: the largest pad load over the planned lifts
       * from the assist crane's own outrigger-load data, and the pad (or mat) under it.
       */
      pads: z
        .object({
          kind: z.enum(['outrigger', 'track']),
          loadT: positive.max(1000, 'Enter 1,000 t or less').nullable(),
          lengthM: positive.max(30, 'Enter 30 m or less').nullable(),
          widthM: positive.max(30, 'Enter 30 m or less').nullable(),
          weightKg: nonNegative.max(50_000, 'Enter 50,000 kg or less'),
        })
        .default({ kind: 'outrigger', loadT: null, lengthM: null, widthM: null, weightKg: 0 }),
      /**
       * The tip carried by the assist crane while the boom leaves the ground (a tandem lift), when
       * the data says the tip needs support: where the assist crane stands relative to the tip as
       * it lies flat, the boom angle from which the main crane carries the boom alone (from the
       * manufacturer's raising procedure) and the assist crane's own rigging for it.
       */
      tandem: z
        .object({
          /** Along the boom line from the tip pin lying flat to the assist crane's slewing centre, positive towards the main crane. */
          alongFromTipM: z.number().finite().min(-100, 'Enter −100 m or more').max(300, 'Enter 300 m or less').nullable(),
          /** To the side of the boom line. */
          sideM: nonNegative.max(200, 'Enter 200 m or less').nullable(),
          releaseAngleDeg: z.number().finite().min(1, 'Enter 1° or more').max(85, 'Enter 85° or less').nullable(),
          hookBlockT: nonNegative.max(50, 'Enter 50 t or less'),
          slingsT: nonNegative.max(50, 'Enter 50 t or less'),
          shacklesT: nonNegative.max(50, 'Enter 50 t or less'),
          deductionsT: nonNegative.max(100, 'Enter 100 t or less'),
        })
        .default({ alongFromTipM: null, sideM: null, releaseAngleDeg: null, hookBlockT: 0, slingsT: 0, shacklesT: 0, deductionsT: 0 }),
    }),
    siteHazards: z.object({
      powerLines: z.array(powerLineSchema).max(20),
      buriedServices: label(2000),
      neighbours: label(2000),
      /**
       * How far the hook, the load and its tag lines can reach beyond the boom tip in plan, for the
       * power-line distance (common practice, no source; 3 m unless the planner knows better).
       */
      loadAndTagLineAllowanceM: nonNegative.max(50, 'Enter 50 m or less').default(3),
      /** Sway of the hoist line and of the power line itself in wind (common practice, no source; 2 m unless known). */
      swayAllowanceM: nonNegative.max(30, 'Enter 30 m or less').default(2),
    }),
    /** Added to the boom length for the exclusion zone (common practice, no source; a setting). */
    fallZoneMarginM: nonNegative.max(50, 'Enter 50 m or less'),
    /**
     * Share of a chart or rating above which a lift needs care and a second person's approval (a
     * site setting; 75 % is common practice, no source). Above 100 % is never allowed.
     */
    chartCautionPercent: z.number().finite().min(50, 'Enter 50 % or more').max(100, 'Enter 100 % or less').default(75),
    /**
     * How old a wind reading may be when the boom is raised or lowered, the hold before that is
     * released, or work resumes (a job setting; 15 minutes is common practice, no source).
     */
    weatherFreshMinutes: z.number().int('Enter whole minutes from 1 to 30').min(1, 'Enter whole minutes from 1 to 30').max(30, 'Enter whole minutes from 1 to 30').default(15),
  })
  .superRefine((c, ctx) => {
    if (c.ground.source.kind !== 'none' && c.ground.source.reference.length === 0) {
      ctx.addIssue({ code: 'custom', message: 'Give the report or design reference', path: ['ground', 'source', 'reference'] });
    }
    if (c.ground.source.kind === 'temporary_works_design' && c.ground.source.designer.length === 0) {
      ctx.addIssue({ code: 'custom', message: 'Name the temporary-works designer (person and firm)', path: ['ground', 'source', 'designer'] });
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
