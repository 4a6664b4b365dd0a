import type { BoomMakeup } from '../calc/boom.js';
import type { SlewPoint, TrackPressureResult } from '../calc/ground.js';
import type { PowerLineBasis } from '../calc/site.js';
import type { ArrangementData, AssistCrane, InventoryItem, WindLimit } from '../schemas/arrangement.js';
import type { Figure, FigureStatus } from '../schemas/configuration.js';

/** What the configuration is computed against, loaded by the server (or the planner) beforehand. */
export interface PlannerInputs {
  arrangement: ArrangementData;
  /** The crane unit's components as the boom make-up sees them. */
  inventory: InventoryItem[];
  /** The chosen assist crane's data, when one is chosen. */
  assistCrane: AssistCrane | null;
}

/** Ground pressure for one load case over the whole slew range. */
export interface LoadCaseResult {
  key: 'raising' | 'lift' | 'unloaded';
  label: string;
  /** Total vertical load on the ground (of the weight set that gave the worst pressure). */
  verticalLoadKn: number;
  /** Moment about the slewing centre, positive towards the boom (same weight set). */
  momentKnm: number;
  /**
   * The governing pressure at every slew angle from 0° to 180° (the worse weight set at each angle);
   * 180° to 360° mirrors it, the tracks being mirror images about their axis. Detail is on the three points below.
   */
  slew: { angleDeg: number; pressureKpa: number }[];
  /** The angle with the highest pressure; the figure is checked at it. */
  worst: SlewPoint;
  overEnd: SlewPoint;
  overSide: SlewPoint;
  /** The per-track block under the heavier track at the worst angle. */
  track: TrackPressureResult;
  /** The most loaded mat over the slew range, when mats are used. */
  mats: { pressureKpa: number; angleDeg: number; rule: string } | null;
  allowablePressureKpa: number;
}

/** One assist-crane lift as a share of the chart. */
export interface AssistLiftResultRow {
  label: string;
  totalKn: number;
  capacityKn: number | null;
  chartRadiusM: number | null;
  sharePercent: number | null;
  pass: boolean;
  reason: string;
  /** Pass, caution (above the site's caution share) or fail; absent on results stored before it. */
  status?: 'pass' | 'caution' | 'fail';
}

/** The main crane's chart: the heaviest lift and the weight at the tip for raising. */
export interface ChartResults {
  lift: { totalT: number; capacityT: number | null; chartRadiusM: number | null; sharePercent: number | null; status: FigureStatus } | null;
  raise: { totalT: number; limitT: number | null; sharePercent: number | null; status: FigureStatus } | null;
}

/** One boom angle of the tandem raise: the assist crane's share of the boom at the tip. */
export interface TandemStepRow {
  angleDeg: number;
  radiusM: number;
  tipHeightM: number;
  totalKn: number;
  sharePercent: number | null;
  status: FigureStatus;
}

/** Clearance to one power line. */
export interface PowerLineResult {
  label: string;
  /** Null when the voltage is not known. */
  voltageKv: number | null;
  distanceM: number;
  /** Minimum approach distance for the voltage; null above 1,000 kV (the owner's distance). */
  requiredClearanceM: number | null;
  /** Distance left between the line and the farthest reach of the boom, hook, load and sway. */
  availableClearanceM: number;
  /** The main crane's reach in plan from its slewing centre. */
  reachM: number;
  /** Which rule set the minimum: Table A, the default, the default for an unknown voltage, or the owner. */
  basis: PowerLineBasis;
  /** The basis in a few words, e.g. "20 ft default, up to 350 kV". */
  basisWords: string;
  pass: boolean;
  /** The assist crane against the same line, when one is planned. */
  assist: { distanceM: number | null; reachM: number | null; availableClearanceM: number | null; pass: boolean } | null;
}

/** Everything computed for a configuration; the server stores it and its figures win. */
export interface ConfigurationResults {
  figures: Figure[];
  makeup: BoomMakeup;
  reeving: {
    hookBlockId: string;
    parts: number;
    sheaveCount: number;
    /** Efficiency of the boom-tip load sheaves the parts run over. */
    tipSheaveEfficiency: number;
    /** Efficiency of the hook block's sheaves. */
    blockSheaveEfficiency: number;
    /** Each lead sheave between the drum and the tip, with its own efficiency. */
    leadSheaves: { id: string; bearing: 'plain' | 'rolling'; efficiency: number }[];
    leadLinePullKn: number;
    requiredParts: number | null;
    /** Rope paid out with the hook at its lowest position, and the wraps left on the drum; null when not computed. */
    ropePaidOutM: number | null;
    wrapsLeft: number | null;
  } | null;
  loadCases: LoadCaseResult[];
  assistLifts: AssistLiftResultRow[];
  /** The main crane's chart figures; absent on results stored before they were computed. */
  chart?: ChartResults;
  /** The tandem raise when the tip must be carried; empty when it need not be. */
  tandem?: TandemStepRow[];
  powerLines: PowerLineResult[];
  fallZoneRadiusM: number;
  platesRequired: boolean;
  windLimits: { assembly: WindLimit; raising: WindLimit } | null;
}
