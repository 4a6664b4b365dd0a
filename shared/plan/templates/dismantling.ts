/**
 * The dismantling template. It is its own sequence, not erection run backwards: most boom
 * collapses happen while pins come out, so every stage around pins and guy lines ends in a
 * mandatory hold, and a hold that must come before pins are drawn sits in a stage of its own
 * ahead of the pin-drawing stage (a stage's hold opens only when its steps are done).
 * Placeholders in braces are filled from the configuration. The manufacturer's manual always wins.
 */
import type { StageWording } from './types.js';

/** The dismantling stages in board order; the support and joint stages repeat once per joint, tip first. */
export const dismantlingStages = {
  site: {
    id: 'dm-site',
    title: 'Site, ground and communications for taking down',
    summary: 'Make the site safe and agree how the crew talks before the boom comes down.',
    cautions: [
      'Nothing on this job moves until this stage’s hold is released.',
      'The boom comes down along a path that must stay outside every power line’s approach distance.',
    ],
    involvesCraneMovement: false,
    steps: {
      layDownArea: {
        text: 'Check the ground where the boom will lie, {boomLengthM} m of it, is firm, clear, and has room for the blocking.',
        roles: ['supervisor', 'rigger'],
      },
      plates: {
        text: 'Check the steel plates are still in place under the crawler ends.',
        roles: ['rigger', 'supervisor'],
      },
    },
    hold: {
      title: 'Site and communications ready for taking down',
      instruction:
        'The exclusion zone is set, the lay-down area is clear, power lines are marked, the wind is within the limit and every radio answers. Acknowledge only what you have seen yourself.',
      roles: ['supervisor', 'operator', 'signaller'],
      mandatory: true,
    },
  },

  lower: {
    id: 'dm-lower',
    title: 'Lower the boom onto blocking',
    summary: 'Bring the boom down onto blocking at the points the manual gives.',
    cautions: [
      'Nobody under the boom or inside the exclusion zone while it comes down.',
      'Lower slowly, on the signaller’s direction only.',
    ],
    involvesCraneMovement: true,
    steps: {
      unload: { text: 'Take any load and loose gear off the hooks.', roles: ['rigger', 'signaller'] },
      blocking: {
        text: 'Place the blocking at the points the manual gives for a {boomLengthM} m boom. Photo of the blocking.',
        roles: ['rigger'],
        photo: true,
      },
      limiterMode: {
        text: 'Switch the limiter to its assembly mode only if and as the manual allows. Record who switched it.',
        roles: ['operator'],
        record: { kind: 'reading', label: 'Switched by', unit: null },
      },
      tipSupport: {
        text: 'Carry the tip with the assist crane or a tip dolly as the boom comes down, as the crane data asks for this length.',
        roles: ['signaller', 'supervisor'],
      },
      lower: {
        text: 'On signal, lower the boom slowly until it rests on the blocking at every point.',
        roles: ['operator', 'signaller'],
      },
    },
    hold: {
      title: 'Boom resting on its blocking',
      instruction: 'The boom rests on blocking at every stated point and the boom hoist is stopped.',
      roles: ['operator', 'signaller', 'rigger'],
      mandatory: true,
    },
  },

  unreeve: {
    id: 'dm-unreeve',
    title: 'Unreeve the hoists',
    summary: 'Take the hoist ropes off the hook block and out of the tip.',
    cautions: ['Drums turn only on signal; hands stay clear of sheaves and running rope.'],
    involvesCraneMovement: true,
    steps: {
      block: { text: 'Lower hook block {hookBlockId} to the ground in line with the tip.', roles: ['operator', 'rigger'] },
      unreeve: {
        text: 'Release the rope socket at the dead end and wind the main hoist rope back onto its drum through the block and the tip sheaves.',
        roles: ['rigger', 'operator'],
      },
      aux: {
        text: 'Set {hookBlockId} down, release the auxiliary socket and wind the auxiliary line back onto its drum.',
        roles: ['rigger', 'operator'],
      },
      stow: { text: 'Stow the hook block and secure the rope ends on the drums.', roles: ['rigger'] },
    },
    hold: null,
  },

  electrics: {
    id: 'dm-electrics',
    title: 'Disconnect electrics and sensors',
    summary: 'Disconnect the boom cable, switches and sensors before the boom comes apart.',
    cautions: ['Disconnect with the crane at rest and the operator told.'],
    involvesCraneMovement: false,
    steps: {
      sensors: {
        text: 'Disconnect the anemometer, the boom angle and load sensors and the limit switches; cap every plug.',
        roles: ['rigger', 'operator'],
      },
      cable: { text: 'Disconnect the boom cable at the junction boxes and reel it in.', roles: ['rigger'] },
    },
    hold: null,
  },

  slacken: {
    id: 'dm-slacken',
    title: 'Slacken the guy lines',
    summary: 'Let the guy lines go slack with the boom hoist before anyone touches a guy-line pin.',
    cautions: [
      'No guy-line pin is touched until this stage’s hold is released.',
      'Nobody on the boom or between the guy lines while the boom hoist pays out.',
    ],
    involvesCraneMovement: true,
    steps: {
      clear: { text: 'Check nobody is on the boom or between the guy lines.', roles: ['rigger', 'signaller'] },
      payOut: { text: 'On signal, pay out the boom hoist until every guy line hangs slack.', roles: ['operator', 'signaller'] },
      look: { text: 'Walk the lines and confirm each one is slack along its whole length.', roles: ['rigger'] },
    },
    hold: {
      title: 'Guy lines slack',
      instruction: 'Every guy line is slack and the boom hoist is stopped. Only then may anyone touch a guy-line pin.',
      roles: ['operator', 'signaller', 'rigger'],
      mandatory: true,
    },
  },

  guys: {
    id: 'dm-guys',
    title: 'Unpin the guy lines',
    summary: 'Take the slack guy lines off the boom, line by line.',
    cautions: [
      'Drive pins out from the outside; never reach through the lattice.',
      'A line that is not slack is not unpinned: stop and call the supervisor.',
    ],
    involvesCraneMovement: true,
    steps: {
      line: {
        text: 'Guy line {mark}, {n} of {quantity} ({lengthM} m): {pins}. Take out the split pins, drive the pins out from the outside, tip end first, and stow the line with its pins and keepers. Record its serial.',
        roles: ['rigger', 'supervisor'],
        record: { kind: 'serial', label: 'Guy-line serial', unit: null },
      },
    },
    hold: {
      title: 'Guy-line pins accounted for',
      instruction: 'Every guy line is off the boom and stowed, and all {guyPins} pins and their keepers are counted.',
      roles: ['rigger', 'supervisor'],
      mandatory: true,
    },
  },

  support: {
    id: 'dm-support-{n}',
    title: 'Support section {position} ({typeId})',
    summary: 'Support the {typeId} section above joint {n} before any of the joint’s pins are drawn.',
    cautions: [
      'Nobody inside or under the boom.',
      'If the assist crane carries the section, its hook stays on until the section is set down.',
    ],
    involvesCraneMovement: true,
    steps: {
      support: {
        text: 'Support section {position} ({typeId}, {weightT} t): blocking under it at the points the manual gives, or the assist crane hooked on with soft slings and the weight taken on signal.',
        roles: ['rigger', 'signaller'],
      },
      clear: { text: 'Check nobody is inside or under the boom.', roles: ['signaller', 'supervisor'] },
    },
    hold: {
      title: 'Section {position} supported',
      instruction:
        'Section {position} is supported by blocking or the assist crane, and nobody is inside or under the boom. Only then are the pins of joint {n} drawn.',
      roles: ['rigger', 'signaller'],
      mandatory: true,
    },
  },

  joint: {
    id: 'dm-joint-{n}',
    title: 'Draw the pins of joint {n}',
    summary: 'Take joint {n} apart and set section {position} down on timber.',
    cautions: [
      'Drive pins out from the outside; never stand inside or under the boom.',
      'If a pin binds, stop. Never hammer it free while it carries load; ask the signaller for the movement the manual gives.',
    ],
    involvesCraneMovement: true,
    steps: {
      pins: {
        text: 'Joint {n}, {below} to {above}: {pins}. Take out the keepers and drive the pins out from the outside, in the order the manual gives.',
        roles: ['rigger'],
      },
      setDown: { text: 'On signal, lift section {position} clear and set it down on timber.', roles: ['signaller', 'rigger'] },
      serial: {
        text: 'Record the serial of the section taken off (planned: {plannedSerial}).',
        roles: ['rigger', 'supervisor'],
        record: { kind: 'serial', label: 'Serial taken off', unit: null },
      },
      stow: { text: 'Put the pins and keepers back in their stowage on the section.', roles: ['rigger'] },
    },
    hold: {
      title: 'Joint {n} apart',
      instruction: 'Section {position} is down on timber, and the pins and keepers of joint {n} ({pins}) are counted.',
      roles: ['rigger', 'supervisor'],
      mandatory: true,
    },
  },

  counterweight: {
    id: 'dm-counterweight',
    title: 'Counterweight off',
    summary: 'Take the counterweight off block by block in the stated order: the last block fitted comes off first.',
    cautions: [
      'Nobody under a suspended block or between a block and the upper works.',
      'Blocks come off in the stated order only.',
    ],
    involvesCraneMovement: true,
    steps: {
      confirm: {
        text: 'Check the counterweight on the crane is the planned {counterweight}. If more is fitted, stop and get the order for taking it off from the manual.',
        roles: ['operator', 'supervisor'],
      },
      block: {
        text: 'Take off counterweight block {blockId} ({weightT} t), {n} of {count}. Left on the crane after this block: {remainingT} t.',
        roles: ['rigger', 'operator'],
      },
    },
    hold: {
      title: 'Counterweight off in order',
      instruction: 'Every block came off in the stated order and is set down on firm ground.',
      roles: ['operator', 'rigger'],
      mandatory: true,
    },
  },

  close: {
    id: 'dm-close',
    title: 'Make safe and hand back the site',
    summary: 'Leave the crane ready for transport and the site as agreed.',
    cautions: [
      'If the boom base comes off for transport, treat it as a lift of its own: support it before its foot pins are drawn, as the manual says.',
    ],
    involvesCraneMovement: false,
    steps: {
      damage: {
        text: 'Report any damage found while taking down; that part goes to quarantine. Photo of the damage, or of the parts stacked when there is none.',
        roles: ['rigger', 'supervisor'],
        photo: true,
      },
      transport: { text: 'Set the crawlers and upper works for transport as the manual says.', roles: ['operator', 'rigger'] },
      site: { text: 'Take down the exclusion zone once the supervisor says so, and leave the site as agreed.', roles: ['supervisor'] },
    },
    hold: {
      title: 'Taking down complete',
      instruction: 'Every part is set down, counted and stowed, and the site is handed back.',
      roles: ['supervisor'],
      mandatory: false,
    },
  },
} as const satisfies Record<string, StageWording>;
