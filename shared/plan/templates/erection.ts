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
        // The site hold accepts the ground: this is the step it attests.
        required: true,
      },
      mats: {
        text: 'Lay the crane mats ({lengthM} × {widthM} × {thicknessM} m) where the plan shows them.',
        roles: ['rigger', 'supervisor'],
        required: true,
        caution: 'Nobody between a mat being placed and the ground or another mat.',
      },
      plates: {
        text: 'Lay steel plates under the crawler ends: the crane data asks for them from {thresholdM} m of boom, and this boom is {boomLengthM} m. Photo of the plates in place.',
        roles: ['rigger', 'supervisor'],
        required: true,
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
    title: 'Crawlers, mast and counterweight',
    summary: 'Set the crawlers, raise the mast and fit the counterweight the crane data asks for to raise this boom, block by block in its fitting order.',
    cautions: [
      'Nobody under a suspended counterweight block or between a block and the upper works.',
      'The operator moves only on the signaller’s signal.',
      // Counterweight sized to balance a long boom tips the crane backwards when there is little or
      // no boom in front of it, most of all while it travels or slews (common practice, no source).
      'Backward stability: with counterweight on and too little boom the crane can tip over backwards. No travel and no slew with counterweight on until the boom the manual asks for is pinned; counterweight and boom go on in the order the manual gives.',
    ],
    involvesCraneMovement: true,
    steps: {
      level: {
        text: 'Check the crane stands level: a slope of no more than {slopePercent} %, the crane data’s limit for raising. Record the slope.',
        roles: ['operator', 'rigger'],
        // Held to the raising limit from the arrangement data: a steeper slope moves the boom's
        // weight sideways and forwards beyond what the raising set-up was worked out for.
        record: { kind: 'reading', label: 'Slope', unit: '%', check: 'max' },
      },
      gauge: {
        text: 'Set the crawlers to a gauge of {gauge}, as the crane data asks for to raise a {boomLengthM} m boom.',
        roles: ['operator', 'rigger'],
      },
      // The mast (gantry) carries the boom hoist reeving and the bridle: it is up and pinned before
      // counterweight or boom hang from it (common practice, no source; the manual gives the order).
      mast: {
        text: 'Raise the mast to its working position on the signaller’s signal and pin it as the manual says{mastWeight}. A keeper in every pin.',
        roles: ['operator', 'rigger'],
        moves: true,
        after: ['gauge'],
      },
      // Blocks go on in the arrangement data's fitting order only, each after the one before: the
      // raising counterweight is a sum of blocks in that order, nothing else.
      block: {
        text: 'Fit counterweight block {blockId} ({weightT} t), {n} of {count} in the crane data’s fitting order. On the crane after this block: {cumulativeT} t of the {raisingT} t the crane data asks for to raise a {boomLengthM} m boom.',
        roles: ['rigger', 'operator'],
        moves: true,
        after: ['mast'],
      },
      cwCount: {
        text: 'Count the counterweight blocks on the crane against the plan: {count} blocks, {counterweight} in all. Record the tonnes on the crane.',
        roles: ['rigger', 'operator'],
        record: { kind: 'reading', label: 'Counterweight on the crane', unit: 't', check: 'plan' },
      },
      limiterMode: {
        text: 'Switch the limiter to its assembly mode only if and as the manual allows. Record who switched it.',
        roles: ['operator'],
        // A name, not a figure: recorded only.
        record: { kind: 'reading', label: 'Switched by', unit: null, check: null },
      },
    },
    hold: {
      title: 'Counterweight and gauge as planned',
      instruction: 'The mast is up and pinned, counterweight {counterweight} is on in the stated order and the crawlers are at {gauge}.',
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
        text: 'Inspect the connecting pins and keepers for this boom, {pinCount} in all: {footPins} at the boom foot, {jointPins} in the joints and {guyPins} in the guy lines. Replace any bent, cracked or worn one; never fit a makeshift keeper.',
        roles: ['rigger', 'supervisor'],
      },
      guyLines: {
        text: 'Inspect the guy lines ({lineCount} lines) and their connectors: marks readable, no kinks, cracks or damaged pin holes.',
        roles: ['rigger', 'supervisor'],
      },
      // Ropes, their end fittings, the sheaves they run over and the over-hoist switch hold the
      // load and the boom as surely as the pins do, so they are checked before they are rigged.
      ropes: {
        text: 'Inspect the wire ropes of the {ropes}: no broken wires, kinks, crushing, birdcaging, corrosion or loss of diameter beyond what the manual allows, and each rope spooled tight on its drum.',
        roles: ['rigger', 'supervisor'],
      },
      // A wedge socket holds only when the live line pulls straight in line with its pin and the
      // tail is long enough and clamped to itself, never to the live line (from memory: ASME B30.26
      // and rope makers' fitting instructions; the manual gives the figures).
      wedgeSockets: {
        text: 'Check every wedge socket: the live line runs in line with the socket pin, the wedge is seated, the tail is as long as the manual says and clamped as the manual says, never to the live line.',
        roles: ['rigger', 'supervisor'],
      },
      sheaves: {
        text: 'Inspect the sheaves at the tip, on the mast and at the boom foot: grooves not worn or chipped, each turns freely, rope guards and keepers in place.',
        roles: ['rigger', 'supervisor'],
      },
      overHoist: {
        text: 'Inspect the over-hoist switch and its weight{auxSwitch}: the switch arm moves freely, the weight and its chain are whole and the cable is undamaged.',
        roles: ['rigger', 'supervisor'],
      },
      hookBlock: {
        text: 'Inspect hook block {hookBlockId}: sheaves, hook, latch and swivel. Record its serial.',
        roles: ['rigger', 'supervisor'],
        record: { kind: 'serial', label: 'Hook block serial', unit: null, check: null },
      },
      auxHook: {
        text: 'Inspect the auxiliary hook {hookBlockId}: hook, latch and swivel. Record its serial.',
        roles: ['rigger', 'supervisor'],
        record: { kind: 'serial', label: 'Auxiliary hook serial', unit: null, check: null },
      },
      laydown: {
        text: 'Position {position}: lay the {typeId} section ({lengthM} m, {weightT} t) on timber in line, top face up ({topFace}). Record the serial laid here (planned: {plannedSerial}).',
        roles: ['rigger', 'supervisor'],
        caution: 'Timber under both ends. Nobody under the section while it is lifted.',
        record: { kind: 'serial', label: 'Serial at this position', unit: null, check: null },
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
    title: 'Boom foot and sections, joint by joint',
    summary: 'Pin the base section into the boom foot, fit the backstops, then pin the sections together from the base to the tip, one joint at a time.',
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
      // The boom foot pins carry the whole boom into the upper works; they are counted like any
      // joint's pins. The count is the crane data's pins at the foot of the base section.
      foot: {
        text: 'Boom foot: on the signaller’s signal, lift the base section ({typeId}) into the boom foot on the upper works and fit the foot pins: {pins}. A keeper in every pin. Record the pins fitted; photo of the pins and keepers.',
        roles: ['rigger', 'supervisor'],
        moves: true,
        photo: true,
        caution: 'The base stays hooked on until every foot pin and keeper is in. Nobody under the base section.',
        record: { kind: 'reading', label: 'Foot pins fitted, each with its keeper', unit: null, check: 'plan' },
        required: true,
        after: ['slings'],
      },
      // The backstops join the base section to the upper works; they stop the boom going over
      // backwards once it is up, so they go on with the base, before the boom is lengthened
      // (common practice, no source; the manual gives how).
      backstops: {
        text: 'Fit the boom backstops between the base section and the upper works and pin them as the manual says, a keeper in every pin.',
        roles: ['rigger', 'operator'],
        after: ['foot'],
      },
      // Each joint is pinned to a base that is already in the boom foot. The pin count is checked
      // against the crane data because a missing pin is the commonest cause of a boom failing at a
      // joint (common practice, no source).
      joint: {
        text: 'Joint {n}, {below} to {above}: {pins}. Top pins in from the outside first. Then, on the signaller’s signal, lift only until the lower holes line up, stop, and fit the lower pins. A keeper in every pin. Record the pins fitted; photo of the pins and keepers.',
        roles: ['rigger', 'supervisor'],
        moves: true,
        photo: true,
        caution: 'The assist crane stays hooked on until every pin and keeper of this joint is in. Nobody under or inside the section.',
        record: { kind: 'reading', label: 'Pins fitted, each with its keeper', unit: null, check: 'plan' },
        required: true,
        after: ['foot'],
      },
    },
    // Mandatory: every later stage hangs load on these pins.
    hold: {
      title: 'Every joint pinned',
      instruction:
        'The boom foot ({footPins}) and all {jointCount} joints ({jointPinsWords}) are pinned, each pin with its keeper, counted against the plan: {allPins} in all. Nothing is suspended and the boom rests on its blocking.',
      roles: ['rigger', 'supervisor'],
      mandatory: true,
    },
  },

  // Laying the guy lines out may run while the sections are pinned; pinning them may not (below).
  guyLayout: {
    id: 'er-guy-layout',
    title: 'Guy lines laid out',
    summary: 'Lay the guy lines out beside the boom in order, tip end first, and record which line lies where. This may go on while the sections are being pinned; no line is pinned yet.',
    cautions: [
      'Keep each line straight along the boom; a twisted line goes back for checking.',
      'Nobody under a line or a section while it is lifted.',
    ],
    involvesCraneMovement: true,
    steps: {
      line: {
        text: 'Guy line {mark}, {n} of {quantity} ({lengthM} m): lay it out beside its place on the boom, straight and untwisted, and match the mark on its connectors. Record its serial.',
        roles: ['rigger', 'supervisor'],
        record: { kind: 'serial', label: 'Guy-line serial', unit: null, check: null },
      },
    },
    hold: null,
  },

  // Guy lines are pinned only once every joint is pinned: a line pinned to a section that is still
  // moving on a hook, or to a boom that is not yet whole, is loaded in ways it is not made for.
  guys: {
    id: 'er-guys',
    title: 'Guy lines pinned',
    summary: 'Pin the laid-out guy lines to the pinned boom, tip end first, and connect the bridle.',
    cautions: [
      'Pin a line only to sections resting on their blocking, never to one that hangs on a hook.',
      'Spread both legs of every split pin evenly.',
      'Keep each line straight along the boom; a twisted line goes back for checking.',
    ],
    involvesCraneMovement: true,
    steps: {
      line: {
        text: 'Guy line {mark}, {n} of {quantity}: {pins}. Pin it tip end first with the pins in from the side the manual gives, a keeper or split pin in each with its legs spread. Record the pins fitted; photo of the pins.',
        roles: ['rigger', 'supervisor'],
        photo: true,
        record: { kind: 'reading', label: 'Guy-line pins fitted, each with its keeper', unit: null, check: 'plan' },
        required: true,
      },
      // The bridle ties the guy lines to the boom hoist; it is connected once every line is on.
      bridle: {
        text: 'Connect the bridle to the guy lines as the manual shows, a keeper in every pin, with the bridle sitting square and its rope free in the mast sheaves. Photo of the connection.',
        roles: ['rigger', 'supervisor'],
        photo: true,
        required: true,
      },
    },
    // Mandatory: tensioning loads every one of these pins.
    hold: {
      title: 'Guy-line pins counted',
      instruction: 'Every guy-line pin and its keeper is in and checked: {guyPins} on {lineCount} lines, counted against the plan, and the bridle is connected.',
      roles: ['rigger', 'supervisor'],
      mandatory: true,
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
        moves: true,
        photo: true,
      },
    },
    hold: null,
  },

  tension: {
    id: 'er-tension',
    title: 'Tensioning',
    summary: 'Draw the guy lines taut with the boom hoist while the tip stays on the ground, then lock the boom hoist before anyone goes back on the boom.',
    cautions: [
      'Nobody on the boom or between the guy lines while they are drawn taut.',
      'The boom hoist stops before the tip leaves the ground.',
    ],
    involvesCraneMovement: true,
    steps: {
      clear: {
        text: 'Check nobody is on the boom or between the guy lines, and nothing loose is left on the boom.',
        roles: ['rigger', 'signaller'],
        required: true,
      },
      signaller: {
        text: 'Signaller in place with a clear view of the boom hoist drum and the lines.',
        roles: ['signaller'],
      },
      // The lines are drawn only once the boom is clear and watched.
      draw: {
        text: 'On signal, wind the boom hoist in slowly until the guy lines are taut; stop while the tip still rests on the ground.',
        roles: ['operator'],
        moves: true,
        after: ['clear', 'signaller'],
      },
      // A boom hoist left live can be moved by a touch and snatch the lines while people are beside
      // them: pawl or brake set and the control locked before anyone goes back (common practice, no source).
      lock: {
        text: 'Boom hoist stopped: set its pawl or brake as the manual says and lock the control before anyone goes back on or along the boom.',
        roles: ['operator'],
        required: true,
        after: ['draw'],
      },
      look: {
        text: 'Walk the lines: each one straight, no twist, no pin or keeper moved.',
        roles: ['rigger'],
        after: ['lock'],
      },
    },
    hold: {
      title: 'Boom hoist stopped and locked, tip still on the ground',
      instruction: 'The guy lines are taut, the boom hoist has stopped with its pawl or brake set and the control locked, and the tip still rests on the ground. Acknowledge only if you saw it stop.',
      roles: ['operator', 'signaller'],
      mandatory: true,
    },
  },

  // Reeving puts riggers at the tip and along the boom, where nobody may be while the lines are
  // drawn taut: it never runs beside the tensioning, only after its hold (common practice, no source).
  reeve: {
    id: 'er-reeve',
    title: 'Main hoist reeving',
    summary: 'Reeve the main hoist through the tip sheaves and the hook block for the planned parts of line, once the tensioning hold is released.',
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
        moves: true,
        after: ['block'],
      },
      count: {
        text: 'Count the parts of line at the block (planned: {parts}) and record the count.',
        roles: ['rigger'],
        record: { kind: 'reading', label: 'Parts of line', unit: null, check: 'plan' },
        after: ['pay-out'],
      },
      overHoist: {
        text: 'Fit the over-hoist switch weight on the hoist rope.',
        roles: ['rigger'],
        after: ['pay-out'],
      },
      socket: {
        text: 'Fix the wedge socket at the dead end the way the manual shows: live line in line with the pin, tail as long as the manual says and clamped as it says. Photo of the socket.',
        roles: ['rigger'],
        photo: true,
        after: ['pay-out'],
      },
    },
    hold: {
      title: 'Reeving checked',
      instruction: 'The block hangs on {parts} parts of line, the rope sits in every sheave, and the wedge socket and over-hoist weight are fitted.',
      roles: ['rigger', 'operator'],
      mandatory: false,
    },
  },

  aux: {
    id: 'er-aux',
    title: 'Auxiliary hoist',
    summary: 'Reeve the auxiliary hoist on a single line through the auxiliary sheave, once the tensioning hold is released.',
    cautions: ['The drum turns only on signal; hands stay clear of the sheave and running rope.'],
    involvesCraneMovement: true,
    steps: {
      line: {
        text: 'Run a single line from the auxiliary drum through the auxiliary sheave to {hookBlockId}.',
        roles: ['rigger', 'operator'],
        moves: true,
      },
      limit: {
        text: 'Fit and connect the auxiliary over-hoist switch and its weight.',
        roles: ['rigger'],
        after: ['line'],
      },
      socket: {
        text: 'Fix the auxiliary wedge socket the way the manual shows: live line in line with the pin, tail as long as the manual says and clamped as it says. Photo of the socket.',
        roles: ['rigger'],
        photo: true,
        after: ['line'],
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
        after: ['cable'],
      },
      sensors: {
        text: 'Connect the boom angle and load sensors; the operator confirms the cab readings make sense.',
        roles: ['rigger', 'operator'],
        after: ['cable'],
      },
      anemometer: {
        text: 'Fit and connect the anemometer; the cab shows a wind reading.',
        roles: ['rigger', 'operator'],
        after: ['cable'],
      },
    },
    hold: null,
  },

  // The limiter protects only the configuration keyed in, and a screen shows what was typed, not
  // what hangs on the crane: the hold checks the physical crane as well as the controller.
  config: {
    id: 'er-config',
    title: 'Configuration entry',
    summary: 'Check the crane itself, key the configuration into the controller, and have a second person check what it shows.',
    cautions: ['The limiter protects only the configuration keyed in: a wrong entry means wrong limits.'],
    involvesCraneMovement: false,
    steps: {
      cwBlocks: {
        text: 'At the crane, not on the screen: count the counterweight blocks on the crane ({count} blocks, {counterweight} planned) and record the tonnes on the crane.',
        roles: ['rigger', 'signaller', 'supervisor'],
        record: { kind: 'reading', label: 'Counterweight on the crane', unit: 't', check: 'plan' },
        required: true,
      },
      parts: {
        text: 'At the hook block, not on the screen: count the parts of line (planned: {parts}) and record the count.',
        roles: ['rigger', 'signaller', 'supervisor'],
        record: { kind: 'reading', label: 'Parts of line', unit: null, check: 'plan' },
        required: true,
      },
      hookBlock: {
        text: 'At the hook, not on the screen: the block on the rope is {hookBlockId}; read its plate and record its serial.',
        roles: ['rigger', 'signaller', 'supervisor'],
        record: { kind: 'serial', label: 'Hook block on the rope', unit: null, check: null },
        required: true,
      },
      enter: {
        text: 'Key in the configuration: {boomLengthM} m boom, hook block {hookBlockId} on {parts} parts of line, counterweight {counterweight}, operating mode “{operatingMode}”.',
        roles: ['operator'],
      },
      mode: {
        text: 'Take the limiter out of its assembly mode.',
        roles: ['operator'],
        after: ['enter'],
      },
      photo: {
        text: 'Photograph the controller screen showing these values.',
        roles: ['operator', 'supervisor'],
        photo: true,
        after: ['enter', 'mode'],
      },
    },
    hold: {
      title: 'Configuration checked against the plan',
      instruction:
        'First the crane itself: the counterweight blocks, the parts of line and the hook block were counted and read at the crane in this stage. Then a second person reads the values the controller shows and types them in here, without looking at the plan. They must match the plan before the hold can be released.',
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
    // The raise is decided here: the raising wind limit applies from this stage on.
    boom: 'prepares',
    steps: {
      // The checks the ready-to-raise hold attests are required: the hold means nothing without them.
      clear: { text: 'Nothing left on the boom: tools, timber, pins, people.', roles: ['rigger'], required: true },
      seated: { text: 'Every rope sits in its sheave groove.', roles: ['rigger'], required: true },
      backstops: { text: 'Boom backstops in position.', roles: ['rigger', 'operator'], required: true },
      assistArms: { text: 'Assist arms lowered.', roles: ['operator'] },
      limits: { text: 'Limit switches wired and tested.', roles: ['operator'] },
      zone: { text: 'The exclusion zone is clear of people, vehicles and loads.', roles: ['signaller', 'supervisor'], required: true },
      plates: { text: 'Steel plates in place under the crawler ends.', roles: ['rigger', 'supervisor'], required: true },
      travel: { text: 'Travel direction set, and the operator knows which way is forward.', roles: ['operator'] },
      tipSupport: {
        text: 'The tip is carried by the assist crane or a tip dolly while the boom leaves the ground, as the crane data asks for this length.',
        roles: ['signaller', 'supervisor'],
        required: true,
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
    boom: 'moves',
    title: 'Raise and test',
    summary: 'Lift the tip off the ground and stop to check, raise the boom to working angle, and prove every limit before any lift.',
    cautions: [
      'Raise slowly, on the signaller’s direction only.',
      'Stop at once on any unexpected noise, movement or reading.',
      'Nobody under the boom or inside the exclusion zone.',
    ],
    involvesCraneMovement: true,
    steps: {
      liftOff: {
        text: 'On signal, raise the boom slowly until the tip just leaves the ground, and stop.',
        roles: ['operator', 'signaller'],
        moves: true,
      },
      // The first moments off the ground load the pins, lines, brake and ground fully for the first
      // time: stop there, where the boom can still be set back down, and look (common practice, no source).
      stopCheck: {
        text: 'Stopped with the tip just off the ground, check before going on: the boom hoist brake holds the boom still, the guy lines are even on both sides, and the crawlers, mats and blocking are not settling. If anything is wrong, lower back onto the blocking.',
        roles: ['signaller', 'supervisor', 'rigger'],
        required: true,
        after: ['lift-off'],
      },
      raise: { text: 'On signal, raise the boom the rest of the way, slowly, to working angle.', roles: ['operator', 'signaller'], after: ['stop-check'], moves: true },
      // The function-test hold attests each limit test: they are required.
      overHoist: { text: 'Test the main over-hoist limit: it must stop the hook before the block reaches the tip.', roles: ['operator'], after: ['raise'], required: true },
      auxOverHoist: { text: 'Test the auxiliary over-hoist limit the same way.', roles: ['operator'], after: ['raise'], required: true },
      boomLimits: { text: 'Test the boom angle limits, up and down.', roles: ['operator'], after: ['raise'], required: true },
      // The known load is the main hook block, whose weight the crane data gives. A load indicator
      // must never read below the load it carries and should read at most 10 % above it (SAE J159,
      // from memory): the check holds the reading to at least the known load, the safe side.
      limiter: {
        text: 'Check the limiter against a load of known weight: hook block {hookBlockId} hanging free, {blockT} t in the crane data. Record the hook load the limiter shows: at least {blockT} t and no more than {blockMaxT} t. If the manual says the limiter leaves the block out of the hook load, stop and ask the supervisor for the manual’s test with a weighed load.',
        roles: ['operator'],
        record: { kind: 'reading', label: 'Limiter showed', unit: 't', check: 'min' },
        required: true,
        after: ['raise'],
      },
      // Only when the crane data gives no weight for the hook block: nothing known to compare with,
      // so the step says so and asks for a weighed load.
      limiterNoKnownLoad: {
        text: 'Check the limiter against a load of known weight. The crane data gives no weight for hook block {hookBlockId}: use a load weighed on a certified scale, and record the hook load the limiter shows beside that weight.',
        roles: ['operator'],
        caution: 'The plan has no known load to compare this reading with: the supervisor compares it with the weighed load before the hold is released.',
        record: { kind: 'reading', label: 'Limiter showed', unit: 't', check: null },
        required: true,
        after: ['raise'],
      },
    },
    hold: {
      title: 'Function tests passed',
      instruction: 'The boom held still with the tip just off the ground, every limit stopped the motion it should, and the limiter read the known load ({knownLoad}) correctly.',
      roles: ['operator', 'signaller'],
      mandatory: true,
    },
  },

  handover: {
    id: 'er-handover',
    title: 'Post-assembly inspection and hand-over',
    summary: 'A qualified person inspects the assembled crane against this configuration, then it is handed over for lifting.',
    cautions: ['No lifting until the examination is recorded and the crane is handed over.'],
    involvesCraneMovement: false,
    steps: {
      examination: {
        text: 'A competent person makes the thorough examination of the assembled crane before first use. Record the report’s reference.',
        roles: ['supervisor'],
        // A report reference, not a figure: recorded only.
        record: { kind: 'reading', label: 'Examination report', unit: null, check: null },
        required: true,
      },
      record: { text: 'Check the as-built record: a serial at every position and every photo taken.', roles: ['supervisor'], after: ['examination'] },
      // Handing over before the examination is recorded would put an unexamined crane to work.
      handover: { text: 'Hand the crane over to the lifting team with this record.', roles: ['supervisor'], required: true, after: ['examination', 'record'] },
    },
    hold: {
      title: 'Post-assembly inspection and hand-over',
      instruction: 'A qualified person has inspected the crane against this configuration and the inspection is recorded; the crane is handed over for lifting. Releasing this hold completes the job and closes its record.',
      roles: ['supervisor', 'operator'],
      mandatory: true,
      signOff: true,
    },
  },
} as const satisfies Record<string, StageWording>;
