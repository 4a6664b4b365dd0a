/**
 * Wording used by both templates: the radio check that opens every stage where the crane or the
 * assist crane moves, the communications steps, the site-hazard steps and the assist-crane stage.
 * Our own words; the trade's terms where the trade uses them.
 */
import type { StageWording, StepWording } from './types.js';

/** The radio check that is always the first step of a stage with crane movement. */
export const radioCheckStep = {
  text: 'Radio check on {channelName}: every call sign answers, and the operator confirms they hear the signaller.',
  roles: ['signaller', 'operator', 'supervisor'],
  caution: 'No movement without a clear answer. A stop is given by radio and hand signal first, never only on a screen.',
  // Every stop and every movement signal relies on it: it can never be edited out of a stage.
  required: true,
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
    // A channel name, not a figure: recorded only.
    record: { kind: 'reading', label: 'Radio channel', unit: null, check: null },
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
    // The site hold attests the exclusion zone and the power lines: these steps cannot be removed.
    required: true,
  },
  powerLine: {
    text: 'Overhead line “{label}”, {voltageKv} kV, {distanceM} m from the slewing centre: minimum approach distance {clearance}. Mark it on site; the boom, ropes and load stay outside that distance all the way.',
    roles: ['supervisor'],
    caution: 'Treat every overhead line as live until its owner says in writing that it is not.',
    required: true,
  },
  buriedServices: {
    text: 'Buried services under the crawler path, mats and blocking: {details}.',
    roles: ['supervisor'],
  },
  neighbours: {
    text: 'Tell the neighbours and anyone else on the site what is planned and when: {details}.',
    roles: ['supervisor'],
  },
  // The wind steps protect the hold they sit before (site accepted, ready to raise, lowering):
  // the gust goes through the board's one wind rule for the phase and the step can never be removed.
  wind: {
    text: 'Read the wind on site. Limit for {phase}: gust {gustMs} m/s, mean {meanMs} m/s. Record the gust.',
    roles: ['supervisor', 'operator'],
    record: { kind: 'reading', label: 'Wind gust', unit: 'm/s', check: 'wind' },
    required: true,
  },
  windUnknown: {
    text: 'Read the wind on site. The crane data gives no wind limit for this boom length: do not start until the supervisor has the manufacturer’s limit. Record the gust.',
    roles: ['supervisor', 'operator'],
    record: { kind: 'reading', label: 'Wind gust', unit: 'm/s', check: 'wind' },
    required: true,
  },
} as const satisfies Record<string, StepWording>;

/** Cautions added to a power-line step the planner found too close. */
export const powerLineTooClose = 'The plan shows this clearance is NOT met. Stop: move the crane, shorten the boom, or have the owner make the line dead before going on.';

/**
 * The assist-crane set-up, the same work in both plans (each plan gives it its own id). It ends in
 * a mandatory hold: an assist crane set up other than as its chart, on unchecked ground or with
 * its limiter set for another set-up has no valid capacity at all, and every assist lift of the
 * job relies on it (common practice, no source).
 */
export const assistStage = {
  title: 'Assist crane set-up',
  summary: 'Set the assist crane up where the plan puts it, exactly as its chart is written, before it lifts anything.',
  cautions: [
    'The assist crane’s own chart, limiter and operator govern its lifts.',
    'Nobody under a suspended load; use tag lines, never hands, to steer it.',
  ],
  involvesCraneMovement: true,
  steps: {
    setUp: {
      text: 'Set the assist crane up as chart “{chartId}” is written: its boom length, counterweight and outrigger or crawler set-up. Photo of the crane as set up.',
      roles: ['supervisor', 'signaller'],
      photo: true,
      required: true,
    },
    ground: {
      text: 'Its outriggers fully out as the chart says and on pads, or its tracks on mats, all on ground that has been checked for their load and is clear of buried services.',
      roles: ['supervisor', 'signaller'],
      required: true,
      after: ['set-up'],
    },
    limiter: {
      text: 'Its limiter set to the set-up of chart “{chartId}”: the assist crane’s operator shows it on the limiter and confirms the chart in the cab is the same.',
      roles: ['supervisor', 'signaller'],
      required: true,
      after: ['set-up'],
    },
  },
  hold: {
    title: 'Assist crane set up as its chart',
    instruction:
      'The assist crane stands as chart “{chartId}” is written, on checked ground, and its limiter shows that set-up. Acknowledge only what you have seen yourself. No assist lift before this is released.',
    roles: ['supervisor', 'signaller'],
    mandatory: true,
  },
} as const satisfies Omit<StageWording, 'id'>;

/**
 * The assist crane's lifts, each checked just before it is made: slings, radius and load are
 * confirmed at the moment of the lift, not once in the morning (common practice, no source).
 */
export const assistLiftsStage = {
  title: 'Assist crane lifts',
  summary: 'Each lift the assist crane makes, checked just before it is made.',
  cautions: [
    'A lift whose check is not done is not made.',
    'Nobody under a suspended load; use tag lines, never hands, to steer it.',
  ],
  involvesCraneMovement: true,
  steps: {
    check: {
      text: 'Just before lift {n} ({label}): the load is {totalT} t with rigging at {radiusM} m radius, {share}. Check the slings and shackles, the tag lines, the radius on the ground, and that the assist crane’s limiter still shows its set-up.',
      roles: ['supervisor', 'signaller', 'rigger'],
    },
    lift: {
      text: 'Lift {n}: {label}, on the signaller’s signal only.',
      roles: ['signaller', 'rigger'],
      moves: true,
    },
  },
  hold: null,
} as const satisfies Omit<StageWording, 'id'>;

/** Caution for a planned assist lift the planner did not pass. */
export const assistLiftFails = 'The plan shows this lift does not pass ({reason}). It is not made until the plan is changed.';
