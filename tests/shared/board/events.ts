// The one place the board tests build events. A test gives the fields the reducer reads; the
// fields only the record reads get neutral values here; every event is then parsed by the log's
// own schema (shared/events/log.ts), so a test event that the writer could not have written fails.
import { jobEventSchema, type EventData, type JobEventDto, type JobEventType } from '../../../shared/events/log.js';
import type { CrewRole } from '../../../shared/schemas/jobs.js';

export const JOB_ID = 'a0a0a0a0-0000-4000-8000-000000000001';
/** Invented people of the test crew. */
export const people = {
  sue: { userId: 'u-sue', name: 'Sue Marsh', role: 'supervisor' },
  otto: { userId: 'u-otto', name: 'Otto Brand', role: 'operator' },
  rita: { userId: 'u-rita', name: 'Rita Venn', role: 'rigger' },
  sam: { userId: 'u-sam', name: 'Sam Pike', role: 'signaller' },
  vic: { userId: 'u-vic', name: 'Vic Lowe', role: 'viewer' },
  /** A second supervisor and operator, for shifts and crew changes. */
  ned: { userId: 'u-ned', name: 'Ned Orr', role: 'supervisor' },
  ola: { userId: 'u-ola', name: 'Ola Hart', role: 'operator' },
} as const satisfies Record<string, { userId: string; name: string; role: CrewRole }>;
export type Who = (typeof people)[keyof typeof people];

/** Per event type, the fields the reducer does not read: a test may leave them out. */
interface Neutral {
  'job.updated': 'planRegenerated';
  'crew.set': 'added' | 'removed';
  'configuration.set': 'planRegenerated' | 'configuration' | 'figures' | 'overridesWithdrawn';
  'job.ready': 'state';
  'step.reopened': 'clearedAcknowledgments';
  'hold.acknowledged': 'photoId' | 'values';
  'hold.check.failed': 'photoId';
  'hold.check.reviewed': 'failuresReviewed';
  'job.stopped': 'alreadyStopped';
  'weather.recorded': 'phase' | 'limit' | 'overLimit';
  'defect.reported': 'serial';
}
type NeutralKeys<T extends JobEventType> = T extends keyof Neutral ? Neutral[T] & keyof EventData<T> : never;
/** What a test gives for an event of type T. */
export type TestData<T extends JobEventType> = Omit<EventData<T>, NeutralKeys<T>> & Partial<Pick<EventData<T>, Extract<NeutralKeys<T>, keyof EventData<T>>>>;

const neutral: { [T in keyof Neutral]: Record<Neutral[T], unknown> } = {
  'job.updated': { planRegenerated: false },
  'crew.set': { added: [], removed: [] },
  // The reducer reads no configuration; the schema only asks for an object.
  'configuration.set': { planRegenerated: false, configuration: {}, figures: [], overridesWithdrawn: [] },
  'job.ready': { state: 'ready' },
  'step.reopened': { clearedAcknowledgments: 0 },
  'hold.acknowledged': { photoId: null, values: null },
  'hold.check.failed': { photoId: null },
  'hold.check.reviewed': { failuresReviewed: 0 },
  'job.stopped': { alreadyStopped: false },
  'weather.recorded': { phase: 'assembly', limit: null, overLimit: null },
  'defect.reported': { serial: null },
};
const hasNeutral = (type: JobEventType): type is keyof Neutral => Object.hasOwn(neutral, type);
const neutralOf = (type: JobEventType): Record<string, unknown> => (hasNeutral(type) ? neutral[type] : {});

/** Ten o'clock on an invented working day; events are a minute apart unless a test says when. */
export const T0 = Date.parse('2026-03-02T10:00:00.000Z');
export const minutes = (n: number) => new Date(T0 + n * 60_000).toISOString();

/** One event with an explicit seq, for the tests of the reducer's seq guards. */
export function event<T extends JobEventType>(seq: number, type: T, data: TestData<T>, opts: { by?: Who; at?: string } = {}): JobEventDto {
  const by = opts.by ?? people.sue;
  return jobEventSchema.parse({ jobId: JOB_ID, seq, type, at: opts.at ?? minutes(seq), by: { userId: by.userId, name: by.name, role: by.role }, data: { ...neutralOf(type), ...data } });
}

/** A log under construction: each `next` is the following seq. */
export function eventLog() {
  const events: JobEventDto[] = [];
  return {
    events,
    next<T extends JobEventType>(type: T, data: TestData<T>, opts: { by?: Who; at?: string } = {}): JobEventDto {
      const e = event(events.length + 1, type, data, opts);
      events.push(e);
      return e;
    },
  };
}
