import { describe, expect, it } from 'vitest';
import { parseJobEvent, type EventData, type JobEventDto, type JobEventType } from '../../../shared/events/log.js';
import { describeEvent, namesFromLog, type Named } from '../../../shared/events/sentences.js';
import { clause, sentences } from '../../../shared/text.js';
import { config } from '../plan/plan-fixtures.js';

const by = { userId: 'u', name: 'Priya', role: 'rigger' };
const event = <T extends JobEventType>(type: T, data: EventData<T>, seq = 5): JobEventDto => parseJobEvent({ jobId: 'j', seq, type, at: '2026-10-01T07:00:00.000Z', by, data });

const parts = { kind: 'reading' as const, label: 'Parts of line', unit: null };
const names: Named = {
  stages: [{ id: 't', title: 'Stage t', steps: [{ id: 't.1', text: 'Pin the tip.' }, { id: 't.2', text: 'Count the parts of line', records: parts }], hold: { id: 't.hold', title: 'Pins counted' } }],
};

describe('event sentences', () => {
  it('word board events with step and hold names and the value recorded', () => {
    // The step's own full stop is not doubled.
    expect(describeEvent(event('step.completed', { stageId: 't', stepId: 't.1', value: null, photoId: null }), { names })).toBe('Marked done: Pin the tip.');
    const outOfLimit = { reason: 'Parts of line 5, planned 6.', kind: 'plan' as const, value: '5', valueNumber: 5, planned: 6, tolerance: 0, limit: null, unit: null, source: null };
    expect(describeEvent(event('step.completed', { stageId: 't', stepId: 't.2', value: '5', photoId: null, outOfLimit }), { names })).toBe(
      'Marked done: Count the parts of line. Recorded parts of line 5. OUT OF LIMIT: Parts of line 5, planned 6.',
    );
    expect(describeEvent(event('hold.acknowledged', { stageId: 't', holdId: 't.hold', role: 'signaller', photoId: null, values: null }), { names })).toBe(
      'Acknowledged the hold point “Pins counted” as signaller.',
    );
    expect(describeEvent(event('hold.acknowledged', { stageId: 't', holdId: 't.hold', role: 'rigger', photoId: null, values: null, inspector: true }), { names })).toBe(
      'Acknowledged the hold point “Pins counted” as the qualified inspector (rigger).',
    );
    expect(describeEvent(event('job.stopped', { reason: null, pressedAt: '2026-10-01T07:00:00.000Z', alreadyStopped: false }))).toBe('Raised an ALL STOP.');
    const reading = { meanMs: 6.5, gustMs: 9.1, heightM: 12, lightning: false, poorVisibility: false, ice: false };
    expect(describeEvent(event('weather.recorded', { reading, phase: 'assembly', limit: null, stop: null, overLimit: null }))).toBe(
      'Recorded the wind: mean 6.5 m/s, gust 9.1 m/s at 12 m. Within the limit.',
    );
  });

  it('say a step or hold the names do not know in words, never by its id', () => {
    expect(describeEvent(event('step.reopened', { stageId: 'er-reeve', stepId: 'er-reeve.block', clearedAcknowledgments: 0 }))).toBe('Reopened: a step no longer in the plan.');
  });

  it('word an event a newer server wrote without its internal name or fields', () => {
    // A client may receive a type it does not know before it is updated; the socket does not parse.
    const unknown = JSON.parse('{"jobId":"j","seq":9,"type":"board.somethingNew","at":"2026-10-01T07:00:00.000Z","by":{"userId":"u","name":"P","role":"rigger"},"data":{"stageId":"s1","secretField":1}}') as JobEventDto;
    const line = describeEvent(unknown);
    expect(line).not.toMatch(/somethingNew|stageId|secretField/);
    expect(line).toMatch(/^[A-Z].*\.$/);
  });

  it('word planning events in one line each', () => {
    const crew = [{ userId: 'sup', name: 'Maren Holt' }];
    expect(describeEvent(event('job.updated', { changes: { site: 'Pad 3' }, planRegenerated: false }))).toBe('Changed the site');
    // A change of the site's zone is named in words, never by its field name.
    expect(describeEvent(event('job.updated', { changes: { timeZone: 'Pacific/Auckland' }, planRegenerated: false }))).toBe('Changed the site’s time zone to Pacific/Auckland');
    expect(
      describeEvent(event('crew.set', { crew: [{ userId: 'u2', name: 'Ola Brandt', role: 'operator' }], added: [{ userId: 'u2', role: 'operator' }], removed: [{ userId: 'sup', role: 'rigger' }] }), { crew }),
    ).toBe('Crew: added Ola Brandt as operator; removed Maren Holt as rigger.');
    const figure = (status: 'fail' | 'pass') => ({ key: 'k', value: '1', status, overridable: false });
    const base = { planRegenerated: false, windLimits: null, figures: [figure('fail'), figure('pass')], overridesWithdrawn: [] };
    expect(describeEvent(event('configuration.set', { ...base, configuration: config({ boomLengthM: 18 }) }))).toBe('Configuration saved: 18 m boom; 1 failing');
    const twd = config({ boomLengthM: 60 });
    twd.ground = { ...twd.ground, allowablePressureKpa: 320, source: { kind: 'temporary_works_design', reference: 'TW-0042 rev C', designer: 'P. Marlow, Stanegate Temporary Works' } };
    expect(describeEvent(event('configuration.set', { ...base, figures: [], configuration: twd }))).toBe(
      'Configuration saved: 60 m boom; 0 failing; ground 320 kPa from temporary-works design TW-0042 rev C by P. Marlow, Stanegate Temporary Works',
    );
    expect(describeEvent(event('override.approved', { overrideId: 'o1', figureKey: 'chart.lift' }), { overrides: [{ id: 'o1', figureLabel: 'Share of the chart' }] })).toBe('Override approved for Share of the chart');
  });

  it('name steps from the latest plan the log carries', () => {
    const plan = (text: string) => ({ kind: 'erection', stages: [{ id: 't', title: 'Stage t', steps: [{ id: 't.1', text }], hold: null }] });
    const log = [
      parseJobEvent({ jobId: 'j', seq: 1, type: 'job.ready', at: '2026-10-01T07:00:00.000Z', by, data: { state: 'ready', planVersion: 1, plan: plan('Pin the tip') } }),
      parseJobEvent({ jobId: 'j', seq: 2, type: 'plan.revised', at: '2026-10-01T07:00:00.000Z', by, data: { planVersion: 2, plan: plan('Pin the tip and fit the keeper'), reason: 'Keeper' } }),
    ];
    expect(describeEvent(event('step.completed', { stageId: 't', stepId: 't.1', value: null, photoId: null }), { names: namesFromLog(log) })).toBe('Marked done: Pin the tip and fit the keeper.');
  });
});

describe('sentence helpers', () => {
  it('join sentences with exactly one full stop each', () => {
    expect(sentences('Reason: Wind over the limit.', 'Within the limit', '', null, false)).toBe('Reason: Wind over the limit. Within the limit.');
    expect(clause('Boom hoist stopped..')).toBe('Boom hoist stopped');
  });
});
