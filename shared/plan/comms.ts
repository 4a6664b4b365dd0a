/**
 * The communications plan in words, for the site stage and the briefing: channel, call signs,
 * who directs which motion (only the motions this job has), and the fallback hand signals.
 */
import type { Configuration } from '../schemas/configuration.js';
import type { CommsPlan } from '../schemas/jobs.js';
import { motions as allMotions } from '../schemas/jobs.js';
import { listWords } from './format.js';

type Motion = (typeof allMotions)[number];

function personLabel(userId: string, comms: CommsPlan, names: Record<string, string>): string {
  const name = names[userId];
  const callSign = comms.callSigns.find((c) => c.userId === userId)?.callSign;
  if (name && callSign) return `${name} (${callSign})`;
  return name ?? callSign ?? 'a person not in the crew list';
}

/** The motions this job has: the assist crane and auxiliary hoist only when planned. */
export function motionsFor(cfg: Configuration): Motion[] {
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

