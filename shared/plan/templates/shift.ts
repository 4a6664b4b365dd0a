/**
 * The make-safe checklist at the end of a shift, as wording data: each item says what is made
 * safe, who may tick it, and in which phases of the work it applies. The board draws the items
 * for the job's kind and the phase it stands in (`makeSafeChecklist` in shared/board/shifts.ts).
 * Common practice, no source: these are the checks a crew makes before leaving a boom overnight;
 * the crane manufacturer's manual and the site's rules come first and may ask for more.
 */
import type { CrewRole, JobKind } from '../../schemas/jobs.js';

/**
 * Where the work stands when the shift ends. Erection: `boom-on-ground` until the raise is done,
 * then `boom-up`. Dismantling: `boom-up` until the lowering is done, then `boom-lowered`.
 */
export type WorkPhase = 'boom-on-ground' | 'boom-up' | 'boom-lowered';

export const workPhaseWords: Record<WorkPhase, string> = {
  'boom-on-ground': 'boom being assembled on the ground',
  'boom-up': 'boom raised',
  'boom-lowered': 'boom lowered, sections being taken apart',
};

export interface MakeSafeItemWording {
  text: string;
  roles: readonly CrewRole[];
  /** The item asks for a few words (the forecast, where the key is kept). */
  asksNote?: boolean;
  /** The phases it applies in; every phase when absent. */
  phases?: readonly WorkPhase[];
}

const shared = {
  hookBlocks: {
    text: 'Hook blocks landed or secured so they cannot swing or roll; nothing left on the hook.',
    roles: ['rigger', 'operator'],
  },
  counterweight: {
    text: 'Counterweight stable: every piece fully seated and pinned, none left partly stacked or hanging.',
    roles: ['operator', 'rigger'],
  },
  boomParked: {
    text: 'Boom left as the manufacturer’s manual allows for a crane left unattended (boom angle, hook position, swing brake or lock); the out-of-service wind limit noted.',
    roles: ['operator'],
    phases: ['boom-up'],
  },
  guyLines: {
    text: 'Guy lines in the state the plan allows at this stage: connected and secured, or laid out and tied off; none left half-tensioned.',
    roles: ['rigger'],
    phases: ['boom-on-ground', 'boom-up'],
  },
  engineOff: {
    text: 'Engine off, controls in neutral, brakes and locks set; the key handed to the supervisor.',
    roles: ['operator'],
  },
  keyHeld: {
    text: 'The supervisor holds the crane key: say where it is kept.',
    roles: ['supervisor'],
    asksNote: true,
  },
  exclusionZone: {
    text: 'Exclusion zone closed: barriers and signs in place round the boom, the counterweight and under the boom.',
    roles: ['signaller', 'rigger'],
  },
  forecast: {
    text: 'Forecast for the hours until the next shift noted: wind and gusts, storms, frost.',
    roles: ['supervisor'],
    asksNote: true,
  },
} as const satisfies Record<string, MakeSafeItemWording>;

/** The make-safe items of each kind of job, in the order they are shown; ids are the keys. */
export const makeSafeItems: Record<JobKind, Readonly<Record<string, MakeSafeItemWording>>> = {
  erection: {
    blocking: {
      text: 'Every boom section on the ground sits on blocking or is fully supported; none rests on a pin alone.',
      roles: ['rigger', 'supervisor'],
      phases: ['boom-on-ground'],
    },
    noHangingSection: {
      text: 'No section hangs on a pin or a half-pinned joint: every joint begun is fully pinned and its retainers fitted, or taken apart and the section set down.',
      roles: ['rigger'],
      phases: ['boom-on-ground'],
    },
    ...shared,
  },
  dismantling: {
    pinsSupported: {
      text: 'No pin removed from a section that is not supported: every section with a pin out sits on blocking; none is left hanging from the assist crane or on the other pins.',
      roles: ['rigger'],
    },
    sectionsStowed: {
      text: 'Sections taken off sit on blocking, stacked or loaded and secured, clear of the travel path.',
      roles: ['rigger', 'supervisor'],
      phases: ['boom-lowered'],
    },
    ...shared,
  },
};
