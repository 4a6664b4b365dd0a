/**
 * Wording used by both templates: the radio check that opens every stage where the crane or the
 * assist crane moves, the communications steps, the site-hazard steps and the assist-crane stage.
 * Our own words; the trade's terms where the trade uses them.
 */
import type { StepWording } from './types.js';

/** The radio check that is always the first step of a stage with crane movement. */
export const radioCheckStep = {
  text: 'Radio check on {channelName}: every call sign answers, and the operator confirms they hear the signaller.',
  roles: ['signaller', 'operator', 'supervisor'],
  caution: 'No movement without a clear answer. A stop is given by radio and hand signal first, never only on a screen.',
} as const satisfies StepWording;

/** Communications steps of the site stage; the fills come from the job's communications plan. */
export const commsSteps = {
  channel: {
    text: 'Put every radio on channel {channel}. Call signs: {callSigns}.',
    roles: ['supervisor', 'signaller'],
  },
  channelMissing: {
    text: 'The plan has no radio channel yet: agree one, tell the whole crew, and note it here. Call signs: {callSigns}.',
    roles: ['supervisor', 'signaller'],
    record: { kind: 'reading', label: 'Radio channel', unit: null },
  },
  motions: {
    text: 'One signaller directs each motion: {motions}. The operator moves only on that person’s signal.',
    roles: ['supervisor', 'signaller', 'operator'],
  },
  handSignals: {
    text: 'Go through the fallback hand signals face to face: {handSignals}.',
    roles: ['signaller', 'operator'],
    caution: 'If a radio goes quiet during a movement, the movement stops. Carry on by hand signal only with the signaller in the operator’s full view.',
  },
  toolboxTalk: {
    text: 'Hold the toolbox talk from the briefing. Each crew member confirms they heard it and can ask questions.',
    roles: ['supervisor'],
  },
} as const satisfies Record<string, StepWording>;

/** Site-hazard steps shared by the erection and dismantling site stages. */
export const siteSteps = {
  exclusionZone: {
    text: 'Set out and sign the exclusion zone: at least {radiusM} m from the slewing centre, the fall zone of a {boomLengthM} m boom. Only the crew inside.',
    roles: ['supervisor', 'rigger'],
  },
  powerLine: {
    text: 'Overhead line “{label}”, {voltageKv} kV, {distanceM} m from the slewing centre: minimum approach distance {clearance}. Mark it on site; the boom, ropes and load stay outside that distance all the way.',
    roles: ['supervisor'],
    caution: 'Treat every overhead line as live until its owner says in writing that it is not.',
  },
  buriedServices: {
    text: 'Buried services under the crawler path, mats and blocking: {details}.',
    roles: ['supervisor'],
  },
  neighbours: {
    text: 'Tell the neighbours and anyone else on the site what is planned and when: {details}.',
    roles: ['supervisor'],
  },
  wind: {
    text: 'Read the wind on site. Limit for {phase}: gust {gustMs} m/s, mean {meanMs} m/s. Record the gust.',
    roles: ['supervisor', 'operator'],
    record: { kind: 'reading', label: 'Wind gust', unit: 'm/s' },
  },
  windUnknown: {
    text: 'Read the wind on site. The crane data gives no wind limit for this boom length: do not start until the supervisor has the manufacturer’s limit. Record the gust.',
    roles: ['supervisor', 'operator'],
    record: { kind: 'reading', label: 'Wind gust', unit: 'm/s' },
  },
} as const satisfies Record<string, StepWording>;

/** Cautions added to a power-line step the planner found too close. */
export const powerLineTooClose = 'The plan shows this clearance is NOT met. Stop: move the crane, shorten the boom, or have the owner make the line dead before going on.';

/** The assist-crane stage, the same work in both plans (each plan gives it its own id). */
export const assistStage = {
  title: 'Assist crane set-up',
  summary: 'Set the assist crane up where the plan puts it and go through each lift it will make.',
  cautions: [
    'The assist crane’s own chart, limiter and operator govern its lifts.',
    'Nobody under a suspended load; use tag lines, never hands, to steer it.',
  ],
  involvesCraneMovement: true,
  steps: {
    setUp: {
      text: 'Set the assist crane up on its checked ground with the set-up of chart “{chartId}”, and confirm its limiter shows that set-up.',
      roles: ['supervisor', 'signaller'],
    },
    lift: {
      text: 'Planned lift {n}: {label}, {totalT} t with rigging at {radiusM} m radius, {share}. Check the slings, tag lines and the radius before it is made.',
      roles: ['supervisor', 'signaller', 'rigger'],
    },
  },
  hold: null,
} as const;

/** Caution for a planned assist lift the planner did not pass. */
export const assistLiftFails = 'The plan shows this lift does not pass ({reason}). It is not made until the plan is changed.';
