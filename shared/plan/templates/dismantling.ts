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
        required: true,
      },
      plates: {
        text: 'Check the steel plates are still in place under the crawler ends.',
        roles: ['rigger', 'supervisor'],
        required: true,
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
    boom: 'moves',
    title: 'Lower the boom onto blocking',
    summary: 'Re-check the ground and the wind, then bring the boom down onto blocking at the points the manual gives, landing the hook block on the way.',
    cautions: [
      'Nobody under the boom or inside the exclusion zone while it comes down.',
      'Lower slowly, on the signaller’s direction only.',
    ],
    involvesCraneMovement: true,
    steps: {
      unload: { text: 'Take any load and loose gear off the hooks.', roles: ['rigger', 'signaller'] },
      // The crane has stood on this ground through the job: mats crack and ground softens. Lowering
      // loads the front of the crawlers as much as raising did, so the ground is checked again, to
      // the same slope limit as for raising (arrangement data).
      ground: {
        text: 'Re-check the ground and the mats under the crawlers: no settlement, cracks or soft spots, every mat whole and where the plan shows it. The slope may be no more than {slopePercent} %, the crane data’s limit. Record the slope.',
        roles: ['rigger', 'supervisor'],
        record: { kind: 'reading', label: 'Slope', unit: '%', check: 'max' },
        required: true,
      },
      blocking: {
        text: 'Place the blocking at the points the manual gives for a {boomLengthM} m boom. Photo of the blocking.',
        roles: ['rigger'],
        photo: true,
        required: true,
      },
      limiterMode: {
        text: 'Switch the limiter to its assembly mode only if and as the manual allows. Record who switched it.',
        roles: ['operator'],
        // A name, not a figure: recorded only.
        record: { kind: 'reading', label: 'Switched by', unit: null, check: null },
      },
      tipSupport: {
        text: 'Carry the tip with the assist crane or a tip dolly as the boom comes down, as the crane data asks for this length.',
        roles: ['signaller', 'supervisor'],
        required: true,
      },
      // As the boom comes down the hook block nears the ground first: landed on timber and the hoist
      // paid out, it is never dragged nor drawn up into the tip (common practice, no source).
      landHook: {
        text: 'On signal, start lowering the boom slowly and, as it comes down, land hook block {hookBlockId} on timber ahead of the tip, paying out the hoist so the block is never dragged nor drawn up to the tip.',
        roles: ['operator', 'signaller', 'rigger'],
        moves: true,
        required: true,
        after: ['ground', 'blocking', 'wind', 'tip-support'],
      },
      lower: {
        text: 'On signal, lower the boom the rest of the way, slowly, until it rests on the blocking at every point.',
        roles: ['operator', 'signaller'],
        moves: true,
        after: ['land-hook'],
      },
    },
    hold: {
      title: 'Boom resting on its blocking',
      instruction: 'The boom rests on blocking at every stated point, the hook block is landed, and the boom hoist is stopped.',
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
      block: { text: 'Check hook block {hookBlockId} rests on its timber in line with the tip, clear of the boom.', roles: ['operator', 'rigger'] },
      unreeve: {
        text: 'Release the wedge socket at the dead end and wind the main hoist rope back onto its drum through the block and the tip sheaves.',
        roles: ['rigger', 'operator'],
        moves: true,
        after: ['block'],
      },
      aux: {
        text: 'Set {hookBlockId} down, release the auxiliary wedge socket and wind the auxiliary line back onto its drum.',
        roles: ['rigger', 'operator'],
        moves: true,
      },
      stow: { text: 'Stow the hook block and secure the rope ends on the drums.', roles: ['rigger'], after: ['unreeve', 'aux'] },
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
      clear: { text: 'Check nobody is on the boom or between the guy lines.', roles: ['rigger', 'signaller'], required: true },
      payOut: { text: 'On signal, pay out the boom hoist until every guy line hangs slack.', roles: ['operator', 'signaller'], after: ['clear'], moves: true },
      // As after tensioning: a live boom hoist could draw the lines taut again under a rigger's hands.
      lock: {
        text: 'Boom hoist stopped: set its pawl or brake as the manual says and lock the control before anyone goes along the boom.',
        roles: ['operator'],
        required: true,
        after: ['pay-out'],
      },
      look: { text: 'Walk the lines and confirm each one is slack along its whole length.', roles: ['rigger'], required: true, after: ['lock'] },
    },
    hold: {
      title: 'Guy lines slack',
      instruction: 'Every guy line is slack, the boom hoist is stopped with its pawl or brake set and its control locked. Only then may anyone touch a guy-line pin.',
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
      // The bridle comes off the slack lines first, so no line can be drawn by the boom hoist while it is unpinned.
      bridle: {
        text: 'Disconnect the bridle from the guy lines as the manual shows and secure it to the mast; put its pins and keepers back in their stowage.',
        roles: ['rigger', 'supervisor'],
        required: true,
      },
      line: {
        text: 'Guy line {mark}, {n} of {quantity} ({lengthM} m): {pins}. Take out the split pins, drive the pins out from the outside, tip end first, and stow the line with its pins and keepers. Record its serial.',
        roles: ['rigger', 'supervisor'],
        record: { kind: 'serial', label: 'Guy-line serial', unit: null, check: null },
        required: true,
        after: ['bridle'],
      },
    },
    hold: {
      title: 'Guy-line pins accounted for',
      instruction: 'The bridle is off, every guy line is off the boom and stowed, and all {guyPins} and their keepers are counted.',
      roles: ['rigger', 'supervisor'],
      mandatory: true,
    },
  },

  // With the bridle off, the mast carries nothing and goes down onto its rest before the crane is
  // stripped further (common practice, no source; the manual gives when and how).
  mast: {
    id: 'dm-mast',
    title: 'Mast onto its rest',
    summary: 'Lower the mast onto its rest once the bridle is off the guy lines.',
    cautions: ['Nobody under the mast or between the mast and the upper works while it comes down.'],
    involvesCraneMovement: true,
    steps: {
      clear: { text: 'Check nobody is under the mast or between the mast and the upper works.', roles: ['signaller', 'rigger'] },
      lower: {
        text: 'On signal, lower the mast with the boom hoist onto its rest and secure it as the manual says.',
        roles: ['operator', 'signaller'],
        moves: true,
        after: ['clear'],
      },
    },
    hold: null,
  },

  // Most boom collapses happen while pins come out: blocking goes under both sides of the joint
  // before any of its pins is drawn, so neither section can drop or swing when the joint opens
  // (common practice, no source). The hold of this stage comes before the pin-drawing stage.
  support: {
    id: 'dm-support-{n}',
    title: 'Block joint {n} ({typeId} section {position})',
    summary: 'Blocking under both sides of joint {n}, and the {typeId} section above it supported, before any of the joint’s pins are drawn.',
    cautions: [
      'Nobody inside or under the boom.',
      'If the assist crane carries the section, its hook stays on until the section is set down.',
    ],
    involvesCraneMovement: true,
    steps: {
      blocking: {
        text: 'Blocking under both sides of joint {n}: under the end of {below} and under the end of {above}, at the points the manual gives, so neither section can drop when the pins come out. Photo of the blocking.',
        roles: ['rigger', 'signaller'],
        photo: true,
        required: true,
      },
      support: {
        text: 'Section {position} ({typeId}, {weightT} t) supported: on its blocking, and where the assist crane carries it, hooked on with soft slings and the weight taken on signal.',
        roles: ['rigger', 'signaller'],
        moves: true,
        after: ['blocking'],
      },
      clear: { text: 'Check nobody is inside or under the boom.', roles: ['signaller', 'supervisor'], required: true },
    },
    hold: {
      title: 'Joint {n} blocked on both sides',
      instruction:
        'Blocking is under both sides of joint {n}, section {position} is supported, and nobody is inside or under the boom. Only then are the pins of joint {n} drawn.',
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
        text: 'Joint {n}, {below} to {above}: {pins}. Take out the keepers and drive the pins out from the outside, in the order the manual gives. Record the pins drawn.',
        roles: ['rigger'],
        // Counted against the crane data: a pin left in, or one missing from the stowage, shows here.
        record: { kind: 'reading', label: 'Pins drawn', unit: null, check: 'plan' },
        required: true,
      },
      setDown: { text: 'On signal, lift section {position} clear and set it down on timber.', roles: ['signaller', 'rigger'], after: ['pins'], moves: true },
      serial: {
        text: 'Record the serial of the section taken off (planned: {plannedSerial}).',
        roles: ['rigger', 'supervisor'],
        record: { kind: 'serial', label: 'Serial taken off', unit: null, check: null },
      },
      stow: { text: 'Put the pins and keepers back in their stowage on the section.', roles: ['rigger'], after: ['pins'], required: true },
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
      // With the boom off, the counterweight alone can tip the crane backwards (common practice, no source).
      'Backward stability: with counterweight on and the boom off the crane can tip over backwards. No travel and no slew until the counterweight is off as the manual says.',
    ],
    involvesCraneMovement: true,
    steps: {
      confirm: {
        text: 'Count the counterweight on the crane against the planned {counterweight} and record the tonnes. If more is fitted, stop and get the order for taking it off from the manual.',
        roles: ['operator', 'supervisor'],
        record: { kind: 'reading', label: 'Counterweight on the crane', unit: 't', check: 'plan' },
      },
      // Off in the reverse of the fitting order, each block after the one before it; the hold attests every block.
      block: {
        text: 'Take off counterweight block {blockId} ({weightT} t), {n} of {count}. Left on the crane after this block: {remainingT} t.',
        roles: ['rigger', 'operator'],
        required: true,
        moves: true,
        after: ['confirm'],
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
      title: 'Crane made safe and off hire',
      instruction: 'A qualified person has checked that every part is set down, counted and stowed and the crane is safe for transport; the site is handed back. Releasing this hold completes the job and closes its record.',
      roles: ['supervisor'],
      mandatory: true,
      signOff: true,
    },
  },
} as const satisfies Record<string, StageWording>;
