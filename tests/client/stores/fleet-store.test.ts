import { describe, expect, it } from 'vitest';
import type { ComponentDto, InspectionDto } from '../../../shared/schemas/fleet';
import type { UserDto } from '../../../shared/schemas/users';
import { componentQuery, countByStatus, isQuarantined, useFleetStore } from '../../../src/stores/fleet';
import { useSessionStore } from '../../../src/stores/session';
import { json, mockFetchWithStores } from '../api-fakes';

const UNIT_ID = '6f1c2d7e-3a4b-4c5d-8e9f-0a1b2c3d4e5f';
const MODEL_ID = '0b9a8c7d-6e5f-4a3b-9c2d-1e0f9a8b7c6d';

function component(overrides: Partial<ComponentDto>): ComponentDto {
  return {
    id: 'c-' + Math.random().toString(36).slice(2, 8),
    serial: 'IN12-0001',
    kind: 'section',
    typeId: 'ins12',
    typeLabel: 'Insert 12 m',
    modelId: MODEL_ID,
    modelName: 'Invented 250',
    unitId: UNIT_ID,
    unitFleetNumber: 'CC-07',
    location: 'Yard bay 3',
    status: 'serviceable',
    retiredReason: null,
    lastInspection: null,
    createdAt: '2026-10-01T07:00:00.000Z',
    updatedAt: '2026-10-01T07:00:00.000Z',
    ...overrides,
  };
}


function signInAs(overrides: Partial<UserDto>) {
  const session = useSessionStore();
  session.user = {
    id: 'u1',
    email: 'someone@hire.test',
    displayName: 'Someone',
    qualifications: [],
    isAdmin: false,
    canInspect: false,
    active: true,
    hasPassword: true,
    createdAt: '2026-10-01T07:00:00.000Z',
    units: 'metric',
    ...overrides,
  };
}

describe('fleet store', () => {
  const fetchMock = mockFetchWithStores();

  it('builds the component query string from the filters, leaving out empty ones', async () => {
    expect(componentQuery({})).toBe('');
    expect(componentQuery({ q: '   ' })).toBe('');
    expect(componentQuery({ type: 'guy_line', q: ' G12 & <x> ' })).toBe('?type=guy_line&q=G12+%26+%3Cx%3E');

    fetchMock.mockResolvedValue(json(200, { items: [] }));
    const fleet = useFleetStore();
    await fleet.loadComponents({ type: 'section', status: 'quarantined', unitId: UNIT_ID, q: ' IN12 ' });
    expect(fetchMock.mock.calls[0][0]).toBe(`/api/components?type=section&status=quarantined&unitId=${UNIT_ID}&q=IN12`);
    expect(fetchMock.mock.calls[0][1]?.method).toBe('GET');

    await fleet.loadComponents({});
    expect(fetchMock.mock.calls[1][0]).toBe('/api/components');
  });

  it('refuses a filter the server would refuse, without asking it', async () => {
    const fleet = useFleetStore();
    await fleet.loadComponents({ unitId: 'not-a-unit' });
    expect(fetchMock).not.toHaveBeenCalled();
    expect(fleet.problemOf('components')).toMatch(/filter is not valid/);
  });

  it('keeps only the answer to the latest filter when an earlier one arrives late', async () => {
    let releaseFirst: (r: Response) => void = () => undefined;
    fetchMock.mockImplementationOnce(() => new Promise<Response>((resolve) => (releaseFirst = resolve)));
    fetchMock.mockResolvedValueOnce(json(200, { items: [component({ serial: 'NEW-1', status: 'quarantined' })] }));
    const fleet = useFleetStore();
    const first = fleet.loadComponents({ status: 'serviceable' });
    await fleet.loadComponents({ status: 'quarantined' });
    releaseFirst(json(200, { items: [component({ serial: 'OLD-1' })] }));
    await first;
    expect(fleet.components.map((c) => c.serial)).toEqual(['NEW-1']);
    expect(fleet.componentFilter).toEqual({ status: 'quarantined' });
  });

  it('shows a quarantined component as quarantined and counts it', async () => {
    fetchMock.mockResolvedValueOnce(
      json(200, {
        items: [
          component({ serial: 'IN12-0001' }),
          component({ serial: 'IN12-0002', status: 'quarantined', lastInspection: { at: '2026-10-20T09:00:00.000Z', result: 'damaged', byName: 'Ola', thumbnailUrl: null } }),
          component({ serial: 'IN3-0001', status: 'retired', retiredReason: 'scrapped' }),
        ],
      }),
    );
    const fleet = useFleetStore();
    await fleet.loadComponents({ unitId: UNIT_ID });
    const q = fleet.components.find((c) => c.serial === 'IN12-0002')!;
    expect(q.status).toBe('quarantined');
    expect(isQuarantined(q)).toBe(true);
    expect(fleet.components.filter(isQuarantined).map((c) => c.serial)).toEqual(['IN12-0002']);
    expect(countByStatus(fleet.components)).toEqual({ serviceable: 1, quarantined: 1, retired: 1 });
  });

  it('shares one request between callers and keeps a refusal message', async () => {
    fetchMock.mockResolvedValueOnce(json(200, { items: [] }));
    const fleet = useFleetStore();
    await Promise.all([fleet.loadUnits(), fleet.loadUnits()]);
    expect(fetchMock).toHaveBeenCalledTimes(1);

    fetchMock.mockResolvedValueOnce(json(404, { error: { code: 'not_found', message: 'That crane unit was not found.' } }));
    expect(await fleet.loadUnit(UNIT_ID)).toBeNull();
    expect(fleet.problemOf(`unit:${UNIT_ID}`)).toBe('That crane unit was not found.');
    expect(fleet.isLoading(`unit:${UNIT_ID}`)).toBe(false);
  });

  it('keeps the field errors when the server refuses an inspection', async () => {
    fetchMock.mockResolvedValueOnce(
      json(400, {
        error: {
          code: 'validation',
          message: 'The inspection has invalid fields.',
          fields: [
            { path: 'notes', message: 'Describe the damage found' },
            { path: 'photoIds.0', message: 'That photo was not found; add it again' },
          ],
        },
      }),
    );
    const fleet = useFleetStore();
    const photoId = '1a2b3c4d-5e6f-4a1b-8c2d-3e4f5a6b7c8d';
    const result = await fleet.recordInspection('c-1', { result: 'damaged', notes: 'dent', photoIds: [photoId] });
    expect(result).toBeNull();
    expect(fleet.saving).toBe(false);
    expect(fleet.fieldErrors).toEqual({ notes: 'Describe the damage found', 'photoIds.0': 'That photo was not found; add it again' });
    // A control finds the message of anything under it: the photo list shows the first photo's.
    expect(fleet.errorOf('photoIds')).toBe('That photo was not found; add it again');
    expect(fleet.errorOf('result')).toBe('');
    expect(fleet.fieldList).toHaveLength(2);
    expect(fleet.saveProblem).toBe('The inspection has invalid fields.');
    const [url, init] = fetchMock.mock.calls[0];
    expect(url).toBe('/api/components/c-1/inspections');
    expect(init?.method).toBe('POST');
    expect(JSON.parse(String(init?.body))).toEqual({ result: 'damaged', notes: 'dent', photoIds: [photoId] });

    fleet.resetForm();
    expect(fleet.fieldErrors).toEqual({});
  });

  it('asks for notes on a damage finding before sending it', async () => {
    const fleet = useFleetStore();
    expect(await fleet.recordInspection('c-1', { result: 'damaged', notes: '   ', photoIds: [] })).toBeNull();
    expect(fetchMock).not.toHaveBeenCalled();
    expect(fleet.errorOf('notes')).toBe('Describe the damage found');
    fleet.clearFieldError('notes');
    expect(fleet.errorOf('notes')).toBe('');
  });

  it('puts the component quarantined by a damage finding into the list and the detail', async () => {
    const before = component({ id: 'c-9', serial: 'IN12-0009' });
    fetchMock.mockResolvedValueOnce(json(200, { items: [before] }));
    fetchMock.mockResolvedValueOnce(json(200, { component: before, inspections: [] }));
    const fleet = useFleetStore();
    await fleet.loadComponents({});
    await fleet.loadComponent('c-9');

    const inspection: InspectionDto = {
      id: 'i-1',
      componentId: 'c-9',
      at: '2026-10-21T08:00:00.000Z',
      by: { id: 'u1', name: 'Ola Brenner' },
      result: 'damaged',
      notes: 'Lacing bent at the second bay',
      photos: [{ id: 'p1', url: '/api/uploads/p1?sig=x', thumbnailUrl: '/api/uploads/p1/thumbnail?sig=x' }],
    };
    const after = { ...before, status: 'quarantined' as const };
    fetchMock.mockResolvedValueOnce(json(201, { inspection, component: after }));
    const saved = await fleet.recordInspection('c-9', { result: 'damaged', notes: 'Lacing bent at the second bay' });
    expect(saved?.id).toBe('i-1');
    expect(fleet.components[0].status).toBe('quarantined');
    expect(fleet.componentDetails['c-9'].component.status).toBe('quarantined');
    expect(fleet.componentDetails['c-9'].inspections.map((i) => i.id)).toEqual(['i-1']);
  });

  it('lists every failing path of a refused import, and says when the model exists', async () => {
    const fleet = useFleetStore();
    fetchMock.mockResolvedValueOnce(
      json(400, {
        error: {
          code: 'validation',
          message: 'The arrangement file has invalid fields.',
          fields: [
            { path: 'arrangements.3.sectionTypeIds', message: 'sections add up to 30 m, not 27 m' },
            { path: 'arrangements.3.raising.trackGaugeM', message: 'track gauge 6 m is not one of the gauge options' },
            { path: 'drums.0.ropeId', message: 'unknown rope "R30"' },
          ],
        },
      }),
    );
    expect(await fleet.importModel('{"schemaVersion":1}')).toEqual({ kind: 'refused' });
    expect(fleet.fieldList.map((f) => f.path)).toEqual(['arrangements.3.sectionTypeIds', 'arrangements.3.raising.trackGaugeM', 'drums.0.ropeId']);
    expect(fetchMock.mock.calls[0][0]).toBe('/api/crane-models/import');

    fetchMock.mockResolvedValueOnce(json(409, { error: { code: 'model_exists', message: 'A crane model with that id already exists.' } }));
    expect(await fleet.importModel('{"schemaVersion":1}')).toEqual({ kind: 'exists', message: 'A crane model with that id already exists.' });

    expect(await fleet.importModel('{not json')).toEqual({ kind: 'refused' });
    expect(fleet.saveProblem).toMatch(/not JSON/);
    expect(fetchMock).toHaveBeenCalledTimes(2);
  });

  it('lets admins and supervisors change the fleet, riggers inspect, viewers only read', () => {
    const fleet = useFleetStore();
    signInAs({ qualifications: ['viewer'] });
    expect([fleet.canChangeFleet, fleet.canInspect]).toEqual([false, false]);
    signInAs({ qualifications: ['rigger'] });
    expect([fleet.canChangeFleet, fleet.canInspect]).toEqual([false, true]);
    signInAs({ qualifications: ['supervisor'] });
    expect([fleet.canChangeFleet, fleet.canInspect]).toEqual([true, true]);
    signInAs({ qualifications: [], isAdmin: true });
    expect([fleet.canChangeFleet, fleet.canInspect]).toEqual([true, true]);
    signInAs({ qualifications: ['operator', 'signaller'] });
    expect([fleet.canChangeFleet, fleet.canInspect]).toEqual([false, false]);
  });

  it('adds an assist crane from its chart file, and keeps every failing path of a refused chart', async () => {
    const fleet = useFleetStore();
    expect(await fleet.createAssistCrane({ fleetNumber: 'AC-9', operatorName: 'Ola', location: '', chartFileText: '{not json' })).toBeNull();
    expect(fleet.fieldList.map((f) => f.path)).toEqual(['data']);
    expect(fetchMock).not.toHaveBeenCalled();

    fetchMock.mockResolvedValueOnce(
      json(400, { error: { code: 'validation', message: 'The assist crane has invalid fields.', fields: [{ path: 'data.charts.0.points.1.radiusM', message: 'radii must increase down the chart' }, { path: 'operatorName', message: 'Enter the name' }] } }),
    );
    expect(await fleet.createAssistCrane({ fleetNumber: 'AC-9', operatorName: '', location: '', chartFileText: '{"charts":[]}' })).toBeNull();
    expect(fleet.fieldList.map((f) => f.path)).toEqual(['data.charts.0.points.1.radiusM', 'operatorName']);
    expect(fleet.errorOf('operatorName')).toBe('Enter the name');
    const sent = JSON.parse(String(fetchMock.mock.calls[0][1]?.body)) as { fleetNumber: string; data: unknown };
    expect(sent).toMatchObject({ fleetNumber: 'AC-9', data: { charts: [] } });
  });
});
