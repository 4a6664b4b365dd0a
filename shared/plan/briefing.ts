/**
 * The briefing (toolbox talk) that travels with a plan: the job in brief, its hazards, the hold
 * points in order with who acknowledges them, the communications plan, the stop rules and the
 * safety notice. Plain sentences, so the same content prints and shows on a phone.
 */
import type { Briefing, PlanStage } from '../schemas/plan.js';
import { qualificationLabels } from '../schemas/users.js';
import { fmtUp, plain, plainDown, plainUp } from '../format';
import { listWords, tidy } from '../text';
import { commsWords } from './comms.js';
import type { GeneratePlanInput } from './types.js';

const STOP_RULES = [
  'Anyone may call a stop at any time, for any reason, without having to explain first.',
  'Stop by radio and hand signal first. The stop on Holdline is a record and an alarm, not the crane’s stop.',
  'No screen is ever permission to move: every movement is on the signaller’s direction.',
  'If a radio goes quiet during a movement, the movement stops.',
  'End of a shift: nothing left hanging, the boom on its blocking, the state of every pin known, the forecast checked. The next shift starts with a recheck and a briefing.',
  'A role handed over during a shift is signed for by both people.',
];

const SAFETY_NOTICE = [
  'The manufacturer’s manual, the lift plan and the crane’s own limiter govern this work. Where this plan differs from them, they win.',
  'Holdline keeps the crew on one picture of the job. It does not replace the judgement of a competent person, local regulations or licensed practice.',
];

function roleWords(roles: readonly string[]): string {
  return listWords(roles.map((r) => (qualificationLabels as Record<string, string>)[r]?.toLowerCase() ?? r));
}

/** The briefing for a plan from its configuration, hazards and holds. */
export function buildBriefing(input: GeneratePlanInput, stages: readonly PlanStage[]): Briefing {
  const { configuration: cfg, results, arrangement, kind } = input;
  const makeup = results.makeup;
  const listed = makeup.arrangement;
  const jobWord = kind === 'erection' ? 'Erection' : 'Taking down';

  const job: string[] = [];
  const sectionList = makeup.sections.map((s) => s.typeId).join(', ');
  // The boom foot pins are the crane data's pins at the foot of the base section (as in the plan).
  const footPins = makeup.sections[0] ? (arrangement.sectionTypes.find((t) => t.id === makeup.sections[0].typeId)?.pinsPerJoint ?? 0) : 0;
  job.push(
    `${jobWord} of a ${plain(cfg.boomLengthM)} m boom${sectionList ? `: ${sectionList}, foot to tip` : ''}. ` +
      `${footPins + makeup.pinCount.total} connecting pins: ${footPins} at the boom foot, ${makeup.pinCount.jointPins} in ${Math.max(makeup.sections.length - 1, 0)} joints and ${makeup.pinCount.guyLinePins} in ${makeup.totalGuyLineCount} guy lines.`,
  );
  if (!makeup.buildable && makeup.reasons.length > 0) job.push(`This boom cannot be built as planned: ${makeup.reasons.join('; ')}.`);
  job.push(`Main hook: ${cfg.mainHook.hookBlockId} on ${cfg.mainHook.parts} parts of line.`);
  job.push(cfg.auxiliary.enabled ? `Auxiliary hoist: ${cfg.auxiliary.hookBlockId ?? 'hook not chosen'} on a single line through the auxiliary sheave.` : 'No auxiliary hoist on this job.');
  const h = cfg.heaviestLoad;
  job.push(`Heaviest load: ${h.description}, ${plain(h.loadT)} t plus ${plain(h.riggingT)} t of rigging at ${plain(h.radiusM)} m radius.`);
  job.push(
    listed
      ? `For raising: counterweight ${plain(listed.raising.counterweightKg / 1000)} t, crawler gauge ${plain(listed.raising.trackGaugeM)} m.`
      : 'The crane data lists no raising set-up for this boom length.',
  );
  job.push(
    results.platesRequired
      ? `Steel plates under the crawler ends: required (the crane data asks for them from ${plain(arrangement.platesThresholdBoomLengthM)} m of boom).`
      : `Steel plates: not needed at this length (the crane data asks for them from ${plain(arrangement.platesThresholdBoomLengthM)} m).`,
  );
  const src = cfg.ground.source;
  job.push(
    `Ground: ${cfg.ground.groundType.trim() || 'type not given'}, allowable ${plain(cfg.ground.allowablePressureKpa)} kPa, ${src.kind === 'none' ? 'with no ground investigation or design behind it yet' : `from ${src.reference}`}.` +
      (cfg.mats.used ? ` Mats ${plain(cfg.mats.lengthM)} × ${plain(cfg.mats.widthM)} × ${plain(cfg.mats.thicknessM)} m.` : ''),
  );
  if (cfg.assist.lifts.length > 0) job.push(`Assist crane: ${cfg.assist.lifts.length} planned ${cfg.assist.lifts.length === 1 ? 'lift' : 'lifts'}: ${cfg.assist.lifts.map((l) => l.label).join('; ')}.`);

  const hazards: string[] = [];
  if (cfg.siteHazards.powerLines.length === 0) hazards.push('No overhead power lines recorded. Look up before anything moves.');
  cfg.siteHazards.powerLines.forEach((line, i) => {
    const r = results.powerLines[i];
    const required = r && r.requiredClearanceM !== null ? `${fmtUp(r.requiredClearanceM, 2)} m${r.basisWords ? ` (${r.basisWords})` : ''}` : 'to be given by the line’s owner';
    const left = r ? ` ${plainDown(r.availableClearanceM, 1)} m left between the line and the farthest reach of the boom, hook and load.` : '';
    hazards.push(`Overhead line “${line.label}”, ${line.voltageKv === null ? 'voltage unknown' : `${plain(line.voltageKv)} kV`}, ${plain(line.distanceM)} m from the slewing centre: minimum approach distance ${required}.${left}${r && !r.pass ? ' The clearance is NOT met.' : ''}${r?.assist && !r.assist.pass ? ` The assist crane’s clearance is ${r.assist.availableClearanceM === null ? 'not checked yet' : 'NOT met'}.` : ''}`);
  });
  hazards.push(`Exclusion zone: ${plainUp(results.fallZoneRadiusM, 1)} m around the slewing centre, the fall zone of the boom. Only the crew inside.`);
  hazards.push(`Buried services: ${cfg.siteHazards.buriedServices.trim() || 'none recorded; confirm with the site'}.`);
  if (cfg.siteHazards.neighbours.trim()) hazards.push(`Neighbours: ${cfg.siteHazards.neighbours.trim()}.`);
  if (results.windLimits) {
    const { assembly, raising } = results.windLimits;
    hazards.push(`Wind limits: assembly gust ${plain(assembly.gustMs)} m/s, mean ${plain(assembly.meanMs)} m/s; raising and lowering gust ${plain(raising.gustMs)} m/s, mean ${plain(raising.meanMs)} m/s.`);
  } else {
    hazards.push('Wind limits: the crane data gives none for this boom length. Nothing starts until the manufacturer’s limit is known.');
  }
  if (listed?.raising.limits.tipSupportRequired) hazards.push('The tip must be carried by the assist crane or a tip dolly while the boom leaves or reaches the ground.');
  hazards.push(
    kind === 'erection'
      ? 'Nobody under or inside a section that is suspended or only partly pinned. Pins go in from the outside.'
      : 'Most boom collapses happen while pins come out. Guy lines slack before any guy-line pin; each section supported before its pins are drawn; pins driven out from the outside; nobody inside or under the boom.',
  );
  const failing = results.figures.filter((f) => f.status === 'fail');
  if (failing.length > 0) hazards.push(`Checks that do not pass in the plan: ${failing.map((f) => `${f.label} (${f.value})`).join('; ')}.`);

  const holds: string[] = [];
  stages.forEach((s) => {
    if (!s.hold) return;
    holds.push(
      `${holds.length + 1}. ${s.title}: ${s.hold.title}. Acknowledged by the ${roleWords(s.hold.requiredRoles)}, each a different person; released by the supervisor.${s.hold.mandatory ? ' Mandatory: never skipped.' : ''}`,
    );
  });
  if (holds.length === 0) holds.push('This plan has no hold points.');

  const words = commsWords(cfg, input.commsPlan, input.crewNames);
  const comms = [
    words.channel ? `Radio channel: ${words.channel}.` : 'Radio channel: not set yet; agree one before anything moves.',
    `Call signs: ${words.callSigns}.`,
    `Who directs each motion: ${words.motions}.`,
    `Fallback hand signals: ${words.handSignals}.`,
  ];

  return {
    title: tidy(`Toolbox talk: ${jobWord.toLowerCase()} of a ${plain(cfg.boomLengthM)} m boom`),
    // Items built from what people typed may end their own sentence: no doubled full stops.
    sections: [
      { heading: 'The job', items: job.map(tidy) },
      { heading: 'Hazards', items: hazards.map(tidy) },
      { heading: 'Hold points, in order', items: holds.map(tidy) },
      { heading: 'Communications', items: comms.map(tidy) },
      { heading: 'Stop rules', items: STOP_RULES },
      { heading: 'Safety notice', items: SAFETY_NOTICE },
    ],
  };
}
