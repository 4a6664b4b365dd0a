import type { Figure, FigureStatus } from '../../../shared/schemas/configuration';
import { jobStateLabels, type CrewRole, type JobDto, type JobKind, type JobState } from '../../../shared/schemas/jobs';
import { type JobEventDto } from '../../../shared/events/log';
import { qualificationLabels } from '../../../shared/schemas/users';

export { formatWhen } from '../../services/time';

/** The sections of a job's page. */
export type JobTab = 'overview' | 'crew' | 'comms' | 'planner' | 'log';

/** Colour family of a badge; each maps to one of our CSS variables and never stands alone. */
export type Tone = 'stop' | 'hold' | 'done' | 'info' | 'plain';

/** A job's state in words, with its icon and colour. */
export const jobStateWords: Record<JobState, { label: string; icon: string; tone: Tone; hint: string }> = {
  planning: { label: jobStateLabels.planning, icon: 'edit_note', tone: 'info', hint: 'The configuration, crew and plan are being prepared.' },
  ready: { label: jobStateLabels.ready, icon: 'flag', tone: 'hold', hint: 'The plan is locked; the crew is briefed before work starts.' },
  live: { label: jobStateLabels.live, icon: 'play_circle', tone: 'done', hint: 'Work is under way on the board.' },
  stopped: { label: jobStateLabels.stopped, icon: 'pan_tool', tone: 'stop', hint: 'All stop recorded. Nothing moves until the supervisor resumes.' },
  complete: { label: jobStateLabels.complete, icon: 'task_alt', tone: 'plain', hint: 'Finished; the record is closed.' },
  cancelled: { label: jobStateLabels.cancelled, icon: 'block', tone: 'plain', hint: 'Called off before it was complete.' },
};

/** A figure's result in words, with its icon and colour. FAIL is in capitals to stand out in glare. */
export const figureStatusWords: Record<FigureStatus, { label: string; icon: string; tone: Tone }> = {
  pass: { label: 'Pass', icon: 'check_circle', tone: 'done' },
  fail: { label: 'FAIL', icon: 'cancel', tone: 'stop' },
  info: { label: 'Info', icon: 'info', tone: 'info' },
  unverified: { label: 'Unverified', icon: 'help', tone: 'hold' },
  caution: { label: 'Caution', icon: 'warning', tone: 'hold' },
};

/** Headings of the figure groups, in the order the results panel shows them. */
export const figureGroups: { group: Figure['group']; label: string }[] = [
  { group: 'boom', label: 'Boom' },
  { group: 'rope', label: 'Hook and rope' },
  { group: 'ground', label: 'Ground' },
  { group: 'assist', label: 'Assist crane' },
  { group: 'site', label: 'Site' },
  { group: 'wind', label: 'Wind' },
];

export const jobKindLabels: Record<JobKind, string> = { erection: 'Erection', dismantling: 'Dismantling' };

/** What a job's closed record is called: a dismantling job never talks of an erection record. */
export const jobRecordNames: Record<JobKind, string> = { erection: 'erection record', dismantling: 'dismantling record' };

/** A crew role in words. */
export function roleLabel(role: CrewRole | string): string {
  return role in qualificationLabels ? qualificationLabels[role as CrewRole] : role === 'admin' ? 'Administrator' : role;
}

/** A number with its unit, without trailing zeros. */
export function withUnit(value: number, unit: string): string {
  return `${(Math.round(value * 100) / 100).toLocaleString('en-GB')} ${unit}`;
}

function text(value: unknown): string {
  return typeof value === 'string' ? value : typeof value === 'number' ? String(value) : '';
}
function record(value: unknown): Record<string, unknown> {
  return value !== null && typeof value === 'object' && !Array.isArray(value) ? (value as Record<string, unknown>) : {};
}
function list(value: unknown): unknown[] {
  return Array.isArray(value) ? value : [];
}

const changeWords: Record<string, string> = {
  name: 'name',
  site: 'site',
  kind: 'kind of job',
  distribution: 'distribution list',
  commsPlan: 'communications plan',
};

/**
 * One line for an event of the log. The data is the server's; this only words it, and an event
 * type the screen does not know yet is still shown by its type so nothing is hidden.
 */
export function eventSummary(event: Pick<JobEventDto, 'type' | 'data'>, job?: Pick<JobDto, 'crew' | 'overrides'>): string {
  const data = event.data;
  const nameOf = (userId: unknown) => job?.crew.find((m) => m.userId === userId)?.name ?? 'someone no longer in the crew';
  switch (event.type) {
    case 'job.created': {
      const j = record(data.job);
      return `Job created: ${text(j.name)} at ${text(j.site)} (${text(j.kind)})`;
    }
    case 'job.updated': {
      const keys = Object.keys(record(data.changes));
      return keys.length ? `Changed the ${keys.map((k) => changeWords[k] ?? k).join(', ')}` : 'Job changed';
    }
    case 'crew.set': {
      const crew = list(data.crew).map(record);
      const named = (m: Record<string, unknown>) => `${text(crew.find((c) => c.userId === m.userId)?.name) || nameOf(m.userId)} as ${roleLabel(text(m.role)).toLowerCase()}`;
      const added = list(data.added).map(record).map(named);
      const removed = list(data.removed).map(record).map(named);
      const parts = [added.length ? `added ${added.join(', ')}` : '', removed.length ? `removed ${removed.join(', ')}` : ''].filter(Boolean);
      return parts.length ? `Crew: ${parts.join('; ')}` : `Crew saved unchanged (${crew.length} ${crew.length === 1 ? 'person' : 'people'})`;
    }
    case 'configuration.set': {
      const config = record(data.configuration);
      const figures = list(data.figures).map(record);
      const failing = figures.filter((f) => f.status === 'fail').length;
      const unverified = figures.filter((f) => f.status === 'unverified').length;
      const caution = figures.filter((f) => f.status === 'caution').length;
      const withdrawn = list(data.overridesWithdrawn).length;
      const bits = [`${failing} failing`, caution ? `${caution} needing care` : '', unverified ? `${unverified} unverified` : '', withdrawn ? `${withdrawn} override${withdrawn === 1 ? '' : 's'} withdrawn` : ''].filter(Boolean);
      const ground = record(config.ground);
      const source = record(ground.source);
      // A temporary-works allowable is recorded with its reference and designer, so the log says whose design it is.
      const design = source.kind === 'temporary_works_design' ? `; ground ${text(ground.allowablePressureKpa)} kPa from temporary-works design ${text(source.reference)} by ${text(source.designer)}` : '';
      return `Configuration saved: ${text(config.boomLengthM)} m boom; ${bits.join(', ')}${design}`;
    }
    case 'override.requested': {
      const o = record(data.override);
      return `Override asked for ${text(o.figureLabel)} (${text(o.figureValue)}): “${text(o.reason)}”`;
    }
    case 'override.approved': {
      const label = job?.overrides.find((o) => o.id === data.overrideId)?.figureLabel ?? text(data.figureKey);
      return `Override approved for ${label}`;
    }
    case 'plan.generated':
      return 'Drafted the plan from the saved configuration and communications plan.';
    case 'plan.edited':
      return 'Saved hand edits to the draft plan.';
    case 'job.ready': {
      const version = text(data.planVersion);
      return `Locked the plan${version ? ` as version ${version}` : ''}: the job is ready for the board.`;
    }
    default:
      // Never the event's internal name or its fields: a person reads this log.
      return 'Made a change this screen does not describe yet; it is kept in the record.';
  }
}

/** Events of planning (worded here); every other event is the board's (worded by the board). */
export function isPlanningEvent(type: string): boolean {
  return ['job.created', 'job.updated', 'crew.set', 'configuration.set', 'override.requested', 'override.approved', 'plan.generated', 'plan.edited', 'job.ready'].includes(type);
}
