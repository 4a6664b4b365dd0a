import type { BoomMakeup } from '../calc/boom.js';
import type { TrackPressureResult } from '../calc/ground.js';
import type { ArrangementData, AssistCrane, InventoryItem, WindLimit } from '../schemas/arrangement.js';
import type { Figure } from '../schemas/configuration.js';

/** What the configuration is computed against, loaded by the server (or the planner) beforehand. */
export interface PlannerInputs {
  arrangement: ArrangementData;
  /** The crane unit's components as the boom make-up sees them. */
  inventory: InventoryItem[];
  /** The chosen assist crane's data, when one is chosen. */
  assistCrane: AssistCrane | null;
}

/** Ground pressure for one load case. */
export interface LoadCaseResult {
  key: 'raising' | 'overEnd' | 'overSide' | 'unloaded';
  label: string;
  /** Total vertical load on the ground. */
  verticalLoadKn: number;
  /** Overturning moment about the slewing centre in the direction of the case. */
  momentKnm: number;
  /** Pressure under the more heavily loaded track, without mats. */
  track: TrackPressureResult;
  /** Pressure under the mats on the more heavily loaded side, when mats are used. */
  mats: { pressureKpa: number; rule: string } | null;
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
}

/** Clearance to one power line. */
export interface PowerLineResult {
  label: string;
  voltageKv: number;
  distanceM: number;
  /** Minimum approach distance for the voltage; null above the table. */
  requiredClearanceM: number | null;
  /** Distance left between the line and the farthest reach of the boom. */
  availableClearanceM: number;
  pass: boolean;
}

/** Everything computed for a configuration; the server stores it and its figures win. */
export interface ConfigurationResults {
  figures: Figure[];
  makeup: BoomMakeup;
  reeving: {
    hookBlockId: string;
    parts: number;
    sheaveCount: number;
    sheaveEfficiency: number;
    extraLeadSheaves: number;
    leadLinePullKn: number;
    requiredParts: number | null;
  } | null;
  loadCases: LoadCaseResult[];
  assistLifts: AssistLiftResultRow[];
  powerLines: PowerLineResult[];
  fallZoneRadiusM: number;
  platesRequired: boolean;
  windLimits: { assembly: WindLimit; raising: WindLimit } | null;
}
