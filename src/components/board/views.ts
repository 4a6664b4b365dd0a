import type { CrewRole, JobState } from '../../../shared/schemas/jobs';

/** The routed views of a job's live board. */
export type BoardView = 'board' | 'cab' | 'signaller' | 'rigger' | 'console' | 'display';

/** Which view belongs to which role; the first role a person holds in this order wins. */
const viewByRole: [CrewRole, BoardView][] = [
  ['supervisor', 'console'],
  ['operator', 'cab'],
  ['signaller', 'signaller'],
  ['rigger', 'rigger'],
];

/**
 * The view a person lands on for their roles on one job. A supervisor who also rigs still lands on
 * the console (they release holds); anyone without a crew role (viewer, admin) sees the whole board.
 */
export function viewForRoles(roles: readonly CrewRole[]): BoardView {
  return viewByRole.find(([role]) => roles.includes(role))?.[1] ?? 'board';
}

/** The views a person may open from the header: their own, the whole board and the site display. */
export function viewsForRoles(roles: readonly CrewRole[]): BoardView[] {
  const own = viewByRole.filter(([role]) => roles.includes(role)).map(([, view]) => view);
  return ['board', ...own, 'display'];
}

/** Jobs whose live board is worth opening straight away; the others open on the planning page. */
const boardStates: ReadonlySet<JobState> = new Set(['ready', 'live', 'stopped', 'made_safe']);

/** Where opening a job from the list takes a person: their board view, or the planning page. */
export function openJobTarget(job: { id: string; state: JobState; myRoles: readonly CrewRole[] }): { name: string; params: { id: string } } {
  return { name: boardStates.has(job.state) ? viewForRoles(job.myRoles) : 'job', params: { id: job.id } };
}
