import { describe, expect, it } from 'vitest';
import { missingCrewRoles } from '../../../shared/schemas/jobs';

// The roles a job needs before it leaves planning: a person in charge of the lift, an operator and
// a signaller (common practice, no source). The server's readiness and the crew editor read this list.
describe('the required crew roles', () => {
  it('names the required roles nobody holds, in a fixed order', () => {
    expect(missingCrewRoles([])).toEqual(['supervisor', 'operator', 'signaller']);
    expect(missingCrewRoles([{ role: 'supervisor' }, { role: 'rigger' }, { role: 'signaller' }])).toEqual(['operator']);
    expect(missingCrewRoles([{ role: 'supervisor' }, { role: 'operator' }, { role: 'signaller' }])).toEqual([]);
  });

  it('does not count a viewer or a rigger as any of them', () => {
    expect(missingCrewRoles([{ role: 'viewer' }, { role: 'rigger' }])).toEqual(['supervisor', 'operator', 'signaller']);
  });
});
