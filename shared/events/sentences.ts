import { valueCheckFieldLabels } from '../schemas/plan.js';
import { roleLabel } from '../schemas/users.js';
import { clause, plural, sentences } from '../text.js';
import type { JobEventDto, Withdrawn } from './log.js';
import { makeSafeItems } from '../plan/templates/shift.js';
import { SHIFT_START_HOLD_ID } from '../board/shifts.js';

/**
 * How each event of the log reads to a person: one plain sentence (or two) saying what was done,
 * to what, with what value. Who did it, and when, are shown beside it. The board's history, the
 * job's log and the record all word events here, so an event reads the same everywhere.
 */

/** What event sentences need to name steps, holds and stages: a board, or the plans the log carries. */
export interface Named {
  stages: {
    id: string;
    title: string;
    steps: { id: string; text: string; records?: { label: string; unit: string | null } | null }[];
    hold: { id: string; title: string } | null;
  }[];
}

/** What a sentence may name besides the plan: the crew by id, the overrides by id. */
export interface EventWordsContext {
  names?: Named | null;
  crew?: readonly { userId: string; name: string }[];
  overrides?: readonly { id: string; figureLabel: string }[];
}

/** Said of an event a newer server wrote that this version does not know: never its internal name. */
export const UNKNOWN_EVENT = 'Made a change this screen does not describe yet; it is kept in the record.';

const changeWords: Record<string, string> = {
  name: 'name',
  site: 'site',
  kind: 'kind of job',
  distribution: 'distribution list',
  holdReminderMinutes: 'hold reminder time',
  commsPlan: 'communications plan',
  timeZone: 'site’s time zone',
};

function findStep(names: Named | null | undefined, stepId: string) {
  for (const stage of names?.stages ?? []) {
    const step = stage.steps.find((s) => s.id === stepId);
    if (step) return step;
  }
  return null;
}
const stepText = (names: Named | null | undefined, stepId: string) => clause(findStep(names, stepId)?.text ?? 'a step no longer in the plan');
const holdTitle = (names: Named | null | undefined, holdId: string) => names?.stages.find((s) => s.hold?.id === holdId)?.hold?.title ?? 'a hold point no longer in the plan';
const stageTitle = (names: Named | null | undefined, stageId: string) => names?.stages.find((s) => s.id === stageId)?.title ?? 'a stage no longer in the plan';
const roleWords = (role: string) => roleLabel(role).toLowerCase();
const reasonWords = (reason: string | null) => reason && `Reason: ${reason}`;
const makeSafeItemText = (itemId: string) =>
  Object.values(makeSafeItems)
    .map((items) => items[itemId]?.text)
    .find(Boolean) ?? itemId;
const withdrawnWords = (names: Named | null | undefined, withdrawn: readonly Withdrawn[]) =>
  withdrawn.map((w) => `${w.name} as ${w.role === 'inspector' ? 'the inspector' : roleWords(w.role)} at “${w.holdId === SHIFT_START_HOLD_ID ? 'the start-of-shift hold' : holdTitle(names, w.holdId)}”`).join('; ');

/** The sentence for one event. */
export function describeEvent(event: JobEventDto, context: EventWordsContext = {}): string {
  const { names } = context;
  switch (event.type) {
    case 'job.created': {
      const { job } = event.data;
      return `Job created: ${job.name} at ${job.site} (${job.kind})`;
    }
    case 'job.updated': {
      const keys = Object.keys(event.data.changes);
      // A new site zone is named: every later time is read in it.
      const changed = (k: string) => (k === 'timeZone' && event.data.changes.timeZone ? `${changeWords[k]} to ${event.data.changes.timeZone}` : (changeWords[k] ?? k));
      return keys.length ? `Changed the ${keys.map(changed).join(', ')}` : 'Job changed';
    }
    case 'crew.set': {
      const { crew, added, removed } = event.data;
      const nameOf = (userId: string) => crew.find((c) => c.userId === userId)?.name ?? context.crew?.find((m) => m.userId === userId)?.name ?? 'someone no longer in the crew';
      const named = (m: { userId: string; role: string }) => `${nameOf(m.userId)} as ${roleWords(m.role)}`;
      const parts = [added.length ? `added ${added.map(named).join(', ')}` : '', removed.length ? `removed ${removed.map(named).join(', ')}` : ''].filter(Boolean);
      const withdrawn = event.data.withdrawn ?? [];
      return sentences(
        parts.length ? `Crew: ${parts.join('; ')}` : `Crew saved unchanged (${plural(crew.length, 'person', 'people')})`,
        withdrawn.length > 0 && `Acknowledgments taken back with them, so those holds are open again: ${withdrawnWords(names, withdrawn)}`,
      );
    }
    case 'configuration.set': {
      const { configuration, figures, overridesWithdrawn } = event.data;
      const count = (status: string) => figures.filter((f) => f.status === status).length;
      const withdrawn = overridesWithdrawn.length;
      const bits = [
        `${count('fail')} failing`,
        count('caution') ? `${count('caution')} needing care` : '',
        count('unverified') ? `${count('unverified')} unverified` : '',
        withdrawn ? `${plural(withdrawn, 'override')} withdrawn` : '',
      ].filter(Boolean);
      const ground = configuration.ground;
      const source = ground?.source;
      // A temporary-works allowable is recorded with its reference and designer, so the log says whose design it is.
      const design = source?.kind === 'temporary_works_design' ? `; ground ${ground.allowablePressureKpa} kPa from temporary-works design ${source.reference} by ${source.designer}` : '';
      return `Configuration saved: ${configuration.boomLengthM} m boom; ${bits.join(', ')}${design}`;
    }
    case 'override.requested': {
      const o = event.data.override;
      return `Override asked for ${o.figureLabel} (${o.figureValue}): “${o.reason}”`;
    }
    case 'override.approved': {
      const label = context.overrides?.find((o) => o.id === event.data.overrideId)?.figureLabel ?? event.data.figureKey;
      return `Override approved for ${label}`;
    }
    case 'plan.generated':
      return 'Drafted the plan from the saved configuration and communications plan.';
    case 'plan.edited':
      return 'Saved hand edits to the draft plan.';
    case 'job.ready':
      return `Locked the plan as version ${event.data.planVersion}: the job is ready for the board.`;
    case 'job.started':
      return 'Started the job on the board.';
    case 'briefing.acknowledged':
      return event.data.shift !== undefined
        ? `Acknowledged the briefing for plan version ${event.data.planVersion}, shift ${event.data.shift}.`
        : `Acknowledged the briefing for plan version ${event.data.planVersion}.`;
    case 'step.completed': {
      const { stepId, value, photoId, outOfLimit } = event.data;
      const step = findStep(names, stepId);
      const unit = step?.records?.unit ? ` ${step.records.unit}` : '';
      return sentences(
        `Marked done: ${stepText(names, stepId)}`,
        value && `Recorded ${step?.records ? step.records.label.toLowerCase() : 'the value'} ${value}${unit}`,
        outOfLimit && `OUT OF LIMIT: ${clause(outOfLimit.reason)}`,
        !!photoId && 'Photo kept with the record',
      );
    }
    case 'step.reopened': {
      const later = event.data.alsoReopened?.length ?? 0;
      return sentences(`Reopened: ${stepText(names, event.data.stepId)}`, later > 0 && `${plural(later, 'later step')} reopened with it`);
    }
    case 'hold.acknowledged': {
      const { holdId, role, values, photoId, inspector } = event.data;
      const as = inspector ? `the qualified inspector (${roleWords(role)})` : roleWords(role);
      return sentences(`Acknowledged the hold point “${holdTitle(names, holdId)}” as ${as}`, !!values && 'The controller readings typed matched the plan', !!photoId && 'Photo of the controller kept');
    }
    case 'hold.withdrawn':
      return `Withdrew the ${roleWords(event.data.role)}’s acknowledgment of the hold point “${holdTitle(names, event.data.holdId)}”.`;
    case 'hold.released':
      return `Released the hold point “${holdTitle(names, event.data.holdId)}”.`;
    case 'hold.check.failed': {
      const fields = (event.data.fields ?? []).map((f) => valueCheckFieldLabels[f].toLowerCase());
      return sentences(`The configuration check at “${holdTitle(names, event.data.holdId)}” did not match the plan`, fields.length > 0 && `Differed: ${fields.join(', ')}`);
    }
    case 'hold.check.reviewed':
      return sentences(`Reviewed the failed configuration checks at “${holdTitle(names, event.data.holdId)}” with the crew`, event.data.note && `Found: ${event.data.note}`);
    case 'stage.skipped':
      return sentences(`Skipped the stage “${stageTitle(names, event.data.stageId)}”`, reasonWords(event.data.reason));
    case 'job.stopped':
      return sentences(event.data.alreadyStopped ? 'Pressed stop while the job was already stopped' : 'Raised an ALL STOP', reasonWords(event.data.reason));
    case 'job.stop.noted':
      return sentences(`Recorded the cause of the stop: ${event.data.reason}`);
    case 'job.resumed':
      return sentences('Resumed the job after the stop', reasonWords(event.data.reason));
    case 'weather.recorded': {
      const { reading, overLimit } = event.data;
      const flags = [reading.lightning ? 'lightning' : '', reading.ice ? 'ice' : '', reading.poorVisibility ? 'poor visibility' : ''].filter(Boolean);
      const height = typeof reading.heightM === 'number' ? ` at ${reading.heightM} m` : '';
      return sentences(
        `Recorded the wind: mean ${reading.meanMs} m/s, gust ${reading.gustMs} m/s${height}`,
        flags.length > 0 && `Also reported: ${flags.join(', ')}`,
        overLimit ? `Over the limit: ${overLimit}` : 'Within the limit',
      );
    }
    case 'defect.reported':
      return sentences(`Reported a defect${event.data.serial ? ` on ${event.data.serial}` : ''}: ${event.data.description}`, 'Photo kept with the record');
    case 'plan.revised':
      return sentences(`Revised the plan to version ${event.data.planVersion}`, reasonWords(event.data.reason));
    case 'job.completed':
      return 'Completed the job.';
    case 'job.cancelled':
      return sentences('Cancelled the job', reasonWords(event.data.reason));
    case 'crew.member.disabled':
      return sentences(
        `${event.data.name}’s account was disabled`,
        event.data.withdrawn.length > 0 && `Their acknowledgments were taken back: ${withdrawnWords(names, event.data.withdrawn)}`,
      );
    case 'shift.ending':
      return sentences(`Ended shift ${event.data.shift}: the make-safe checklist is on the board`, `${plural(event.data.items.length, 'item')} to do`);
    case 'shift.item.done':
      return sentences(`Made safe: ${clause(makeSafeItemText(event.data.itemId))}`, event.data.note && `Noted: ${event.data.note}`, event.data.madeSafe && 'Every item done: the job is MADE SAFE');
    case 'handover.written':
      return sentences(`Wrote the handover note for shift ${event.data.shift}${event.data.to ? ` to ${event.data.to.name}` : ''}`, `Hazards: ${event.data.hazards}`);
    case 'handover.acknowledged':
      return `Read and acknowledged ${event.data.from.name}’s handover note: now the acting supervisor.`;
    case 'acting.transferred':
      return sentences(`Made ${event.data.to.name} the acting supervisor${event.data.from ? ` in place of ${event.data.from.name}` : ''}`, reasonWords(event.data.reason));
    case 'shift.inspected':
      return sentences(`Recorded the shift inspection before shift ${event.data.shift}`, `Found: ${event.data.note}`);
    case 'shift.start.acknowledged':
      return `Acknowledged the start-of-shift hold for shift ${event.data.shift} as ${roleWords(event.data.role)}.`;
    case 'shift.started':
      return `Released the start-of-shift hold: shift ${event.data.shift} is under way.`;
    default: {
      // An event from a newer server: never its internal name or a list of its fields.
      const unknown: never = event;
      void unknown;
      return UNKNOWN_EVENT;
    }
  }
}

/** Names for steps, holds and stages from the plans a log carries, latest first, so a renamed step reads with its latest words and a removed one keeps its name. */
export function namesFromLog(events: readonly JobEventDto[]): Named {
  const plans = events.flatMap((e) => (e.type === 'job.ready' || e.type === 'plan.revised' || e.type === 'plan.generated' || e.type === 'plan.edited' ? [e.data.plan] : [])).reverse();
  return { stages: plans.flatMap((p) => p.stages) };
}
