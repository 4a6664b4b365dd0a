/**
 * The erection template: stages, steps, cautions and hold points for assembling and raising a
 * lattice boom, in our own plain words for a rigger reading a phone. Placeholders in braces are
 * filled from the configuration. The manufacturer's manual always wins over this wording.
 */
import type { StageWording } from './types.js';

/** The erection stages in board order; the generator decides which are present and their dependencies. */
export const erectionStages = {
  ground: {
    id: 'er-ground',
    title: 'Site, ground and communications',
    summary: 'Make the site safe and agree how the crew talks before anything moves.',
    cautions: [
      'Nothing on this job moves until this stage’s hold is released.',
      'Keep the boom, ropes and any load outside every power line’s approach distance along the whole raising path.',
    ],
    involvesCraneMovement: false,
    steps: {
      ground: {
        text: 'Check the ground under the crawlers is level and firm: {groundType}, allowable pressure {allowableKpa} kPa ({source}).',
        roles: ['supervisor'],
      },
      mats: {
        text: 'Lay the crane mats ({lengthM} × {widthM} × {thicknessM} m) where the plan shows them.',
        roles: ['rigger', 'supervisor'],
        caution: 'Nobody between a mat being placed and the ground or another mat.',
      },
      plates: {
        text: 'Lay steel plates under the crawler ends: the crane data asks for them from {thresholdM} m of boom, and this boom is {boomLengthM} m. Photo of the plates in place.',
        roles: ['rigger', 'supervisor'],
        photo: true,
        caution: 'Nobody between a plate being placed and the ground or the crawler.',
      },
    },
    hold: {
      title: 'Ground, exclusion zone and communications accepted',
      instruction:
        'The exclusion zone is set, the ground accepted, power lines marked, the wind within the assembly limit, and every radio answers. Acknowledge only what you have seen yourself.',
      roles: ['supervisor', 'operator', 'signaller'],
      mandatory: true,
    },
  },

  upper: {
    id: 'er-upper',
    title: 'Crawlers and counterweight',
    summary: 'Set the crawlers and fit the counterweight the crane data asks for to raise this boom.',
    cautions: [
      'Nobody under a suspended counterweight block or between a block and the upper works.',
      'The operator moves only on the signaller’s signal.',
    ],
    involvesCraneMovement: true,
    steps: {
      level: {
        text: 'Check the crane stands level: a slope of no more than {slopePercent} %, the crane data’s limit for raising. Record the slope.',
        roles: ['operator', 'rigger'],
        record: { kind: 'reading', label: 'Slope', unit: '%' },
      },
      gauge: {
        text: 'Set the crawlers to a gauge of {gauge}, as the crane data asks for to raise a {boomLengthM} m boom.',
        roles: ['operator', 'rigger'],
      },
      block: {
        text: 'Fit counterweight block {blockId} ({weightT} t), {n} of {count} in the fitting order. On the crane after this block: {cumulativeT} t.',
        roles: ['rigger', 'operator'],
      },
      limiterMode: {
        text: 'Switch the limiter to its assembly mode only if and as the manual allows. Record who switched it.',
        roles: ['operator'],
        record: { kind: 'reading', label: 'Switched by', unit: null },
      },
    },
    hold: {
      title: 'Counterweight and gauge as planned',
      instruction: 'Counterweight {counterweight} is on in the stated order and the crawlers are at {gauge}.',
      roles: ['operator', 'rigger'],
      mandatory: false,
    },
  },

  check: {
    id: 'er-check',
    title: 'Component check and lay-down',
    summary: 'Check every part for this boom, then lay the sections out in order and record which serial went where.',
    cautions: [
      'A damaged part goes to quarantine and is never fitted.',
      'Nobody under a section while it is lifted.',
    ],
    involvesCraneMovement: true,
    steps: {
      sections: {
        text: 'Inspect every boom section: chords straight and undented, no bent or missing lacing, no cracked welds, pin holes not worn or oval. Quarantine any that fail.',
        roles: ['rigger', 'supervisor'],
      },
      pins: {
        text: 'Inspect the connecting pins and keepers for this boom, {pinCount} in all. Replace any bent, cracked or worn one; never fit a makeshift keeper.',
        roles: ['rigger', 'supervisor'],
      },
      guyLines: {
        text: 'Inspect the guy lines ({lineCount} lines) and their connectors: marks readable, no kinks, cracks or damaged pin holes.',
        roles: ['rigger', 'supervisor'],
      },
      hookBlock: {
        text: 'Inspect hook block {hookBlockId}: sheaves, hook, latch and swivel. Record its serial.',
        roles: ['rigger', 'supervisor'],
        record: { kind: 'serial', label: 'Hook block serial', unit: null },
      },
      auxHook: {
        text: 'Inspect the auxiliary hook {hookBlockId}: hook, latch and swivel. Record its serial.',
        roles: ['rigger', 'supervisor'],
        record: { kind: 'serial', label: 'Auxiliary hook serial', unit: null },
      },
      laydown: {
        text: 'Position {position}: lay the {typeId} section ({lengthM} m, {weightT} t) on timber in line, top face up ({topFace}). Record the serial laid here (planned: {plannedSerial}).',
        roles: ['rigger', 'supervisor'],
        caution: 'Timber under both ends. Nobody under the section while it is lifted.',
        record: { kind: 'serial', label: 'Serial at this position', unit: null },
      },
    },
    hold: {
      title: 'Components serviceable',
      instruction: 'Every part for this {boomLengthM} m boom is inspected and serviceable, and the serial at each position is recorded.',
      roles: ['rigger', 'supervisor'],
      mandatory: false,
    },
  },

  joints: {
    id: 'er-joints',
    title: 'Boom sections, joint by joint',
    summary: 'Pin the sections together from the base to the tip, one joint at a time.',
    cautions: [
      'Nobody under or inside a section that is suspended or only partly pinned.',
      'Pins go in from the outside of the boom; never reach through the lattice.',
      'The stop when the holes line up is given by radio and hand signal, never by a tap on a screen.',
    ],
    involvesCraneMovement: true,
    steps: {
      slings: {
        text: 'Lift the sections with soft slings or protectors at their lifting points, never round the lacings.',
        roles: ['rigger'],
      },
      joint: {
        text: 'Joint {n}, {below} to {above}: {pins}. Top pins in from the outside first. Then, on the signaller’s signal, lift only until the lower holes line up, stop, and fit the lower pins. A keeper in every pin. Photo of the pins and keepers.',
        roles: ['rigger', 'supervisor'],
        photo: true,
        caution: 'The assist crane stays hooked on until every pin and keeper of this joint is in. Nobody under or inside the section.',
      },
    },
    hold: {
      title: 'Every joint pinned',
      instruction:
        'All {jointCount} joints are pinned: {jointPins} pins, each with its keeper, counted against the plan. Nothing is suspended and the boom rests on its blocking.',
      roles: ['rigger', 'signaller'],
      mandatory: false,
    },
  },

  guys: {
    id: 'er-guys',
    title: 'Guy lines',
    summary: 'Lay out and pin the guy lines, tip end first. This can go on while the sections are being pinned.',
    cautions: [
      'Pin a line only to sections resting on their blocking, never to one that hangs on a hook.',
      'Spread both legs of every split pin evenly.',
      'Keep each line straight along the boom; a twisted line goes back for checking.',
    ],
    involvesCraneMovement: true,
    steps: {
      line: {
        text: 'Guy line {mark}, {n} of {quantity} ({lengthM} m): {pins}. Match the mark on its connectors, pin it tip end first with the pins in from the side the manual gives, spread the split pins. Record its serial; photo of the pins.',
        roles: ['rigger', 'supervisor'],
        photo: true,
        record: { kind: 'serial', label: 'Guy-line serial', unit: null },
      },
    },
    hold: {
      title: 'Guy-line pins counted',
      instruction: 'Every guy-line pin and keeper is in and checked: {guyPins} pins on {lineCount} lines, counted against the plan.',
      roles: ['rigger', 'supervisor'],
      mandatory: false,
    },
  },

  tip: {
    id: 'er-tip',
    title: 'Tip fittings',
    summary: 'Fit what the tip carries before any rope goes on.',
    cautions: ['Nobody under a part while it is lifted onto the tip.'],
    involvesCraneMovement: false,
    steps: {
      guides: {
        text: 'Fit the rope guides and cable rollers at the tip and check their keepers.',
        roles: ['rigger'],
      },
      auxSheave: {
        text: 'Fit the auxiliary sheave at the tip, its pins in from the outside and a keeper in each. Photo of the pins and keepers.',
        roles: ['rigger'],
        photo: true,
      },
    },
    hold: null,
  },

  tension: {
    id: 'er-tension',
    title: 'Tensioning',
    summary: 'Draw the guy lines taut with the boom hoist while the tip stays on the ground.',
    cautions: [
      'Nobody on the boom or between the guy lines while they are drawn taut.',
      'The boom hoist stops before the tip leaves the ground.',
    ],
    involvesCraneMovement: true,
    steps: {
      clear: {
        text: 'Check nobody is on the boom or between the guy lines, and nothing loose is left on the boom.',
        roles: ['rigger', 'signaller'],
      },
      signaller: {
        text: 'Signaller in place with a clear view of the boom hoist drum and the lines.',
        roles: ['signaller'],
      },
      draw: {
        text: 'On signal, wind the boom hoist in slowly until the guy lines are taut; stop while the tip still rests on the ground.',
        roles: ['operator'],
      },
      look: {
        text: 'Walk the lines: each one straight, no twist, no pin or keeper moved.',
        roles: ['rigger'],
      },
    },
    hold: {
      title: 'Boom hoist stopped, tip still on the ground',
      instruction: 'The guy lines are taut, the boom hoist has stopped, and the tip still rests on the ground. Acknowledge only if you saw it stop.',
      roles: ['operator', 'signaller'],
      mandatory: true,
    },
  },

  reeve: {
    id: 'er-reeve',
    title: 'Main hoist reeving',
    summary: 'Reeve the main hoist through the tip sheaves and the hook block for the planned parts of line.',
    cautions: [
      'The drum turns only on signal; hands stay clear of sheaves and running rope.',
      'Nobody stands in the bight of a rope.',
    ],
    involvesCraneMovement: true,
    steps: {
      block: {
        text: 'Set hook block {hookBlockId} down in line with the tip sheaves.',
        roles: ['rigger'],
      },
      payOut: {
        text: 'Pay the rope out through the idler and tip sheaves and the block, in the planned order for {parts} parts of line.',
        roles: ['rigger', 'operator'],
      },
      count: {
        text: 'Count the parts of line at the block (planned: {parts}) and record the count.',
        roles: ['rigger'],
        record: { kind: 'reading', label: 'Parts of line', unit: null },
      },
      overHoist: {
        text: 'Fit the over-hoist switch weight on the hoist rope.',
        roles: ['rigger'],
      },
      socket: {
        text: 'Fix the rope socket at the dead end, seated and turned the way the manual shows. Photo of the socket.',
        roles: ['rigger'],
        photo: true,
      },
    },
    hold: {
      title: 'Reeving checked',
      instruction: 'The block hangs on {parts} parts of line, the rope sits in every sheave, and the socket and over-hoist weight are fitted.',
      roles: ['rigger', 'operator'],
      mandatory: false,
    },
  },

  aux: {
    id: 'er-aux',
    title: 'Auxiliary hoist',
    summary: 'Reeve the auxiliary hoist on a single line through the auxiliary sheave.',
    cautions: ['The drum turns only on signal; hands stay clear of the sheave and running rope.'],
    involvesCraneMovement: true,
    steps: {
      line: {
        text: 'Run a single line from the auxiliary drum through the auxiliary sheave to {hookBlockId}.',
        roles: ['rigger', 'operator'],
      },
      limit: {
        text: 'Fit and connect the auxiliary over-hoist switch and its weight.',
        roles: ['rigger'],
      },
      socket: {
        text: 'Fix the auxiliary rope socket the way the manual shows. Photo of the socket.',
        roles: ['rigger'],
        photo: true,
      },
    },
    hold: null,
  },

  electrics: {
    id: 'er-electrics',
    title: 'Electrical and sensors',
    summary: 'Connect and test every switch and sensor the limiter relies on.',
    cautions: ['Test limit switches by hand with the crane at rest, never by driving into them.'],
    involvesCraneMovement: false,
    steps: {
      cable: {
        text: 'Pay out the boom cable, secure it along the boom and connect the junction boxes.',
        roles: ['rigger'],
      },
      limits: {
        text: 'Connect the over-hoist and boom limit switches and trip each by hand: the cab must show every one.',
        roles: ['rigger', 'operator'],
      },
      sensors: {
        text: 'Connect the boom angle and load sensors; the operator confirms the cab readings make sense.',
        roles: ['rigger', 'operator'],
      },
      anemometer: {
        text: 'Fit and connect the anemometer; the cab shows a wind reading.',
        roles: ['rigger', 'operator'],
      },
    },
    hold: null,
  },

  config: {
    id: 'er-config',
    title: 'Configuration entry',
    summary: 'Key the configuration into the crane’s controller and have a second person check what it shows.',
    cautions: ['The limiter protects only the configuration keyed in: a wrong entry means wrong limits.'],
    involvesCraneMovement: false,
    steps: {
      enter: {
        text: 'Key in the configuration: {boomLengthM} m boom, hook block {hookBlockId} on {parts} parts of line, counterweight {counterweight}, operating mode “{operatingMode}”.',
        roles: ['operator'],
      },
      mode: {
        text: 'Take the limiter out of its assembly mode.',
        roles: ['operator'],
      },
      photo: {
        text: 'Photograph the controller screen showing these values.',
        roles: ['operator', 'supervisor'],
        photo: true,
      },
    },
    hold: {
      title: 'Configuration checked against the plan',
      instruction:
        'A second person reads the values the controller shows and types them in here, without looking at the plan. They must match the plan before the hold can be released.',
      roles: ['operator', 'signaller'],
      mandatory: true,
    },
  },

  preRaise: {
    id: 'er-preraise',
    title: 'Pre-raise checks',
    summary: 'Everyone confirms the boom is ready to leave the ground.',
    cautions: ['If anyone is unsure, the boom stays down.'],
    involvesCraneMovement: false,
    steps: {
      clear: { text: 'Nothing left on the boom: tools, timber, pins, people.', roles: ['rigger'] },
      seated: { text: 'Every rope sits in its sheave groove.', roles: ['rigger'] },
      backstops: { text: 'Boom backstops in position.', roles: ['rigger', 'operator'] },
      assistArms: { text: 'Assist arms lowered.', roles: ['operator'] },
      limits: { text: 'Limit switches wired and tested.', roles: ['operator'] },
      zone: { text: 'The exclusion zone is clear of people, vehicles and loads.', roles: ['signaller', 'supervisor'] },
      plates: { text: 'Steel plates in place under the crawler ends.', roles: ['rigger', 'supervisor'] },
      travel: { text: 'Travel direction set, and the operator knows which way is forward.', roles: ['operator'] },
      tipSupport: {
        text: 'The tip is carried by the assist crane or a tip dolly while the boom leaves the ground, as the crane data asks for this length.',
        roles: ['signaller', 'supervisor'],
      },
    },
    hold: {
      title: 'Ready to raise',
      instruction: 'Every role confirms the checks of this stage. The boom goes up only if all of you agree.',
      roles: ['supervisor', 'operator', 'signaller', 'rigger'],
      mandatory: true,
    },
  },

  raise: {
    id: 'er-raise',
    title: 'Raise and test',
    summary: 'Raise the boom to working angle and prove every limit before any lift.',
    cautions: [
      'Raise slowly, on the signaller’s direction only.',
      'Stop at once on any unexpected noise, movement or reading.',
      'Nobody under the boom or inside the exclusion zone.',
    ],
    involvesCraneMovement: true,
    steps: {
      raise: { text: 'On signal, raise the boom slowly to working angle.', roles: ['operator', 'signaller'] },
      overHoist: { text: 'Test the main over-hoist limit: it must stop the hook before the block reaches the tip.', roles: ['operator'] },
      auxOverHoist: { text: 'Test the auxiliary over-hoist limit the same way.', roles: ['operator'] },
      boomLimits: { text: 'Test the boom angle limits, up and down.', roles: ['operator'] },
      limiter: {
        text: 'Check the limiter against a load of known weight. Record the load the limiter showed.',
        roles: ['operator'],
        record: { kind: 'reading', label: 'Limiter showed', unit: 't' },
      },
    },
    hold: {
      title: 'Function tests passed',
      instruction: 'Every limit stopped the motion it should, and the limiter read the known load correctly.',
      roles: ['operator', 'signaller'],
      mandatory: true,
    },
  },

  handover: {
    id: 'er-handover',
    title: 'Examination and handover',
    summary: 'A competent person examines the assembled crane, then it is handed over for lifting.',
    cautions: ['No lifting until the examination is recorded and the crane is handed over.'],
    involvesCraneMovement: false,
    steps: {
      examination: {
        text: 'A competent person makes the thorough examination of the assembled crane before first use. Record the report’s reference.',
        roles: ['supervisor'],
        record: { kind: 'reading', label: 'Examination report', unit: null },
      },
      record: { text: 'Check the as-built record: a serial at every position and every photo taken.', roles: ['supervisor'] },
      handover: { text: 'Hand the crane over to the lifting team with this record.', roles: ['supervisor'] },
    },
    hold: {
      title: 'Examined and handed over',
      instruction: 'The thorough examination is recorded and the crane is handed over for lifting.',
      roles: ['supervisor', 'operator'],
      mandatory: true,
    },
  },
} as const satisfies Record<string, StageWording>;
