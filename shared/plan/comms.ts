/**
 * The communications plan in words, for the site stage and the briefing: channel, call signs,
 * who directs which motion (only the motions this job has), and the fallback hand signals.
 */
import type { Configuration } from '../schemas/configuration.js';
import type { CommsPlan, CrewRole } from '../schemas/jobs.js';
import { motions as allMotions } from '../schemas/jobs.js';
import { listWords } from '../text';

type Motion = (typeof allMotions)[number];

/**
 * A person as the plan names them: name and call sign, or what is known. A person without a call
 * sign is said to have none (readiness flags it); the plan never calls anyone a stranger.
 */
function personLabel(userId: string, comms: CommsPlan, names: Record<string, string>): string {
  const name = names[userId];
  const callSign = comms.callSigns.find((c) => c.userId === userId)?.callSign;
  if (name && callSign) return `${name} (${callSign})`;
  if (callSign) return callSign;
  return name ? `${name} (no call sign yet)` : 'someone with no call sign yet';
}

/** The motions this job has: the assist crane and auxiliary hoist only when planned. */
function motionsFor(cfg: Configuration): Motion[] {
  return allMotions.filter((m) => {
    if (m === 'auxiliary hoist') return cfg.auxiliary.enabled;
    if (m === 'assist crane') return cfg.assist.assistCraneId !== null || cfg.assist.lifts.length > 0;
    return true;
  });
}

/** The communications plan in words: channel, call signs, who directs which motion, fallback signals. */
export function commsWords(cfg: Configuration, comms: CommsPlan, names: Record<string, string> = {}): {
  channel: string | null;
  callSigns: string;
  motions: string;
  handSignals: string;
} {
  const callSigns = comms.callSigns.length > 0
    ? comms.callSigns.map((c) => (names[c.userId] ? `${c.callSign} for ${names[c.userId]}` : c.callSign)).join('; ')
    : 'none set yet, agree them now';
  const wanted = motionsFor(cfg);
  const extra = comms.motionSignallers.map((m) => m.motion).filter((m) => !wanted.includes(m));
  const motionList = [...wanted, ...new Set(extra)].map((motion) => {
    const who = comms.motionSignallers.filter((m) => m.motion === motion).map((m) => personLabel(m.userId, comms, names));
    return `${motion}: ${who.length > 0 ? listWords(who) : 'nobody assigned yet'}`;
  });
  const handSignals = comms.fallbackHandSignals.trim().length > 0
    ? comms.fallbackHandSignals.trim()
    : 'none written in the plan yet; agree at least Stop, Emergency Stop, Hoist, Lower, Raise Boom, Lower Boom, Swing, Travel and Move Slowly';
  return {
    channel: comms.radioChannel.trim().length > 0 ? comms.radioChannel.trim() : null,
    callSigns,
    motions: motionList.join('; '),
    handSignals,
  };
}


/** One reason the communications plan is not ready, for the job's readiness list. */
export interface CommsProblem {
  code: 'comms_motion_unassigned' | 'comms_motion_no_call_sign';
  message: string;
}

/**
 * Every motion this job has is directed by a crew member with a call sign: a signal on the radio is
 * obeyed only from a known voice (common practice, no source). Viewers do not direct motions.
 */
export function commsProblems(cfg: Configuration, comms: CommsPlan, crew: readonly { userId: string; role: CrewRole }[]): CommsProblem[] {
  const problems: CommsProblem[] = [];
  const inCrew = new Set(crew.filter((c) => c.role !== 'viewer').map((c) => c.userId));
  const withCallSign = new Set(comms.callSigns.filter((c) => c.callSign.trim().length > 0).map((c) => c.userId));
  for (const motion of motionsFor(cfg)) {
    const who = comms.motionSignallers.filter((m) => m.motion === motion).map((m) => m.userId);
    if (who.length === 0) {
      problems.push({ code: 'comms_motion_unassigned', message: `Nobody directs the ${motion}. Assign a crew member with a call sign to it in the communications plan.` });
    } else if (!who.some((id) => inCrew.has(id) && withCallSign.has(id))) {
      problems.push({
        code: 'comms_motion_no_call_sign',
        message: `The ${motion} is assigned to someone who is not in the crew or has no call sign. Give them a call sign and a place in the crew, or assign someone who has both.`,
      });
    }
  }
  return problems;
}
