// What each reading of a generated plan is held to, which steps are required, the in-stage order,
// and the template changes a practitioner asked for. Expected figures are read from the raw JSON of
// the invented demo crane (server/demo/data/crane-model.json) or from the configuration, never from
// the generator. Trade reasons are common practice, no source, unless a source is named.
import { describe, expect, it } from 'vitest';
import { commsProblems } from '../../../shared/plan';
import { motions, type CommsPlan } from '../../../shared/schemas/jobs';
import type { Plan, PlanStep } from '../../../shared/schemas/plan';
import { ANN, BEN, CAL, comms, config, listedLengths, mustComeAfter, plan, rawCrane, stage, step, withAssist } from './plan-fixtures';

const arrangementOf = (lengthM: number) => rawCrane.arrangements.find((a) => a.boomLengthM === lengthM)!;
const pinsOf = (typeId: string) => rawCrane.sectionTypes.find((t) => t.id === typeId)!.pinsPerJoint;
const readings = (p: Plan): { stageId: string; step: PlanStep }[] =>
  p.stages.flatMap((s) => s.steps.filter((st) => st.records?.kind === 'reading').map((st) => ({ stageId: s.id, step: st })));

/**
 * What every reading of a plan must be held to, worked out from the raw crane data and the
 * configuration; a reading step this table does not know is a failure, so a new reading must be
 * classified here before it can pass.
 */
function expectedCheck(id: string, lengthM: number, parts: number, hookBlockId: string): unknown {
  const a = arrangementOf(lengthM);
  const raisingT = a.raising.counterweightKg / 1000;
  const slope = a.raising.limits.maxGroundSlopePercent;
  const n = /\.joint-(\d+)$/.exec(id) ?? /^dm-joint-(\d+)\.pins$/.exec(id);
  if (n) return { kind: 'plan', planned: pinsOf(a.sectionTypeIds[Number(n[1])]), tolerance: 0, source: expect.any(String) };
  const line = /^er-guys\.line-(\w+)-\d+$/.exec(id);
  if (line) return { kind: 'plan', planned: a.guyLines.find((g) => g.mark === line[1])!.pinsEach, tolerance: 0, source: expect.any(String) };
  switch (id) {
    case 'er-ground.wind':
      return { kind: 'wind', phase: 'assembly' };
    case 'er-preraise.wind':
    case 'dm-site.wind':
    case 'dm-lower.wind':
      return { kind: 'wind', phase: 'raising' };
    case 'er-upper.level':
    case 'dm-lower.ground':
      return { kind: 'max', limit: slope, source: expect.any(String) };
    case 'er-upper.cw-count':
    case 'er-config.cw-blocks':
    case 'dm-counterweight.confirm':
      return { kind: 'plan', planned: raisingT, tolerance: 0, source: expect.any(String) };
    case 'er-reeve.count':
    case 'er-config.parts':
      return { kind: 'plan', planned: parts, tolerance: 0, source: expect.any(String) };
    case 'er-joints.foot':
      return { kind: 'plan', planned: pinsOf(a.sectionTypeIds[0]), tolerance: 0, source: expect.any(String) };
    case 'er-raise.limiter':
      return { kind: 'min', limit: rawCrane.hookBlocks.find((b) => b.id === hookBlockId)!.weightKg / 1000, source: expect.stringContaining('SAE J159') };
    // Recorded only: a name, a report reference, a channel.
    case 'er-upper.limiter-mode':
    case 'dm-lower.limiter-mode':
    case 'er-handover.examination':
    case 'er-ground.comms-channel':
    case 'dm-site.comms-channel':
      return null;
    default:
      return 'unclassified reading';
  }
}

describe('every reading declares what it is held to', () => {
  it.each(listedLengths)('%d m, erection and dismantling: the plan figure, the limit, the wind phase, or explicitly nothing', (lengthM) => {
    const cfg = withAssist({ boomLengthM: lengthM });
    for (const kind of ['erection', 'dismantling'] as const) {
      const all = readings(plan(kind, cfg));
      expect(all.length).toBeGreaterThan(kind === 'erection' ? 10 : 5);
      for (const { step: st } of all) {
        // `check` is present on every reading: null says "recorded only" on purpose.
        expect(st.records, st.id).toHaveProperty('check');
        expect(st.records?.check, st.id).toEqual(expectedCheck(st.id, lengthM, cfg.mainHook.parts, cfg.mainHook.hookBlockId));
      }
      // Serials are recorded, never compared as numbers.
      for (const s of plan(kind, cfg).stages.flatMap((x) => x.steps).filter((x) => x.records?.kind === 'serial')) expect(s.records?.check, s.id).toBeNull();
    }
  });

  it('a reading with no comms channel yet is recorded only', () => {
    const p = plan('erection', config(), undefined, { ...comms, radioChannel: '' });
    expect(step(p, 'er-ground.comms-channel').records).toMatchObject({ label: 'Radio channel', check: null });
  });

  it('the limiter test states its known load from the plan: the main hook block’s weight from the crane data', () => {
    // Each hook block with sheaves in the raw crane data, its weight in tonnes as the data gives it.
    const blocks = rawCrane.hookBlocks.filter((b) => b.id.startsWith('HB'));
    expect(blocks.length).toBeGreaterThanOrEqual(2);
    for (const b of blocks) {
      const t = String(b.weightKg / 1000);
      const p = plan('erection', config({ boomLengthM: 60, mainHook: { hookBlockId: b.id, parts: 4 } }));
      expect(step(p, 'er-raise.limiter').text).toContain(`hook block ${b.id} hanging free, ${t} t in the crane data`);
      expect(stage(p, 'er-raise').hold?.instruction).toContain(`known load (hook block ${b.id}, ${t} t)`);
    }
    // The upper bound in the text is 110 % of the block, rounded down: HB120 2700 kg, 2.7 t × 1.1 = 2.97 t (SAE J159, from memory).
    expect(rawCrane.hookBlocks.find((b) => b.id === 'HB120')?.weightKg).toBe(2700);
    expect(step(plan('erection', config()), 'er-raise.limiter').text).toContain('at least 2.7 t and no more than 2.97 t');
  });

  it('a hook block the crane data does not know gives no known load: the limiter test asks for a weighed load and compares nothing', () => {
    const p = plan('erection', config({ boomLengthM: 60, mainHook: { hookBlockId: 'NOT-IN-DATA', parts: 4 } }));
    expect(step(p, 'er-raise.limiter').text).toMatch(/gives no weight for hook block NOT-IN-DATA: use a load weighed on a certified scale/);
    expect(step(p, 'er-raise.limiter').records?.check).toBeNull();
    expect(step(p, 'er-raise.limiter').caution).toMatch(/no known load/);
    expect(stage(p, 'er-raise').hold?.instruction).toContain('known load (a weighed load)');
  });
});

describe('required steps and in-stage order', () => {
  const er = plan('erection', withAssist({ boomLengthM: 60, auxiliary: { enabled: true, hookBlockId: 'BALL12' } }));
  const dm = plan('dismantling', withAssist({ boomLengthM: 78 }));

  it('the wind steps before the site hold, the pre-raise hold and the lowering are required', () => {
    for (const id of ['er-ground.wind', 'er-preraise.wind']) expect(step(er, id).required, id).toBe(true);
    for (const id of ['dm-site.wind', 'dm-lower.wind']) expect(step(dm, id).required, id).toBe(true);
  });

  it('every pin-counting step and every step a mandatory hold attests is required; ordinary steps are not', () => {
    const required = er.stages.flatMap((s) => s.steps.filter((st) => st.required).map((st) => st.id));
    for (const id of ['er-joints.foot', 'er-joints.joint-1', 'er-guys.line-GT-1', 'er-guys.bridle', 'er-tension.lock', 'er-config.cw-blocks', 'er-config.parts', 'er-config.hook-block', 'er-assist.set-up', 'er-assist.limiter', 'er-raise.stop-check', 'er-raise.limiter', 'er-handover.examination', 'er-handover.handover']) {
      expect(required, id).toContain(id);
    }
    for (const id of ['er-upper.gauge', 'er-check.sections', 'er-tip.guides', 'er-reeve.block', 'er-electrics.cable']) expect(required, id).not.toContain(id);
    for (const id of ['dm-support-3.blocking', 'dm-joint-3.pins', 'dm-lower.land-hook', 'dm-lower.ground', 'dm-slacken.lock', 'dm-lower.tip-support']) expect(step(dm, id).required, id).toBe(true);
  });

  it('no crane movement before the stage’s radio check has a clear answer', () => {
    const moving = ['er-upper.mast', 'er-upper.cw-CW1', 'er-joints.foot', 'er-joints.joint-3', 'er-tension.draw', 'er-reeve.pay-out', 'er-aux.line', 'er-raise.lift-off', 'er-assist-lifts.lift-1'];
    for (const id of moving) expect(mustComeAfter(er, id, `${id.split('.')[0]}.radio-check`), id).toBe(true);
    for (const id of ['dm-lower.land-hook', 'dm-lower.lower', 'dm-slacken.pay-out', 'dm-mast.lower', 'dm-joint-2.set-down', 'dm-support-2.support']) expect(mustComeAfter(dm, id, `${id.split('.')[0]}.radio-check`), id).toBe(true);
    // Checks that move nothing are not held up by it.
    expect(mustComeAfter(er, 'er-tension.clear', 'er-tension.radio-check')).toBe(false);
  });

  it('the hand-over only after the thorough examination is recorded and the record checked', () => {
    expect(mustComeAfter(er, 'er-handover.handover', 'er-handover.examination')).toBe(true);
    expect(mustComeAfter(er, 'er-handover.handover', 'er-handover.record')).toBe(true);
    expect(mustComeAfter(er, 'er-handover.examination', 'er-handover.handover')).toBe(false);
  });

  it('after tensioning, the boom hoist is locked before anyone walks the lines, and reeving waits for the tensioning stage', () => {
    expect(mustComeAfter(er, 'er-tension.lock', 'er-tension.draw')).toBe(true);
    expect(mustComeAfter(er, 'er-tension.look', 'er-tension.lock')).toBe(true);
    expect(mustComeAfter(er, 'er-tension.draw', 'er-tension.clear')).toBe(true);
    for (const id of ['er-reeve.pay-out', 'er-aux.line']) expect(mustComeAfter(er, id, 'er-tension.lock'), id).toBe(true);
    expect(stage(er, 'er-tension').hold?.instruction).toMatch(/pawl or brake set and the control locked/);
  });

  it('the tip leaves the ground, the crew stops and checks, and only then the raise goes on and the limits are tested', () => {
    expect(mustComeAfter(er, 'er-raise.stop-check', 'er-raise.lift-off')).toBe(true);
    expect(mustComeAfter(er, 'er-raise.raise', 'er-raise.stop-check')).toBe(true);
    for (const id of ['er-raise.over-hoist', 'er-raise.aux-over-hoist', 'er-raise.boom-limits', 'er-raise.limiter']) expect(mustComeAfter(er, id, 'er-raise.raise'), id).toBe(true);
    expect(step(er, 'er-raise.stop-check').text).toMatch(/brake holds the boom still.*guy lines are even.*crawlers, mats and blocking are not settling/);
  });

  it('counterweight blocks go on one after the other in the crane data’s fitting order, after the mast is up', () => {
    const blocks = stage(er, 'er-upper').steps.filter((s) => /\.cw-CW\d+$/.test(s.id));
    // 60 m: 95 000 kg from the data = CW1 12.5 t + CW2 12.5 t + CW3…CW9 7 × 10 t.
    expect(arrangementOf(60).raising.counterweightKg).toBe(95000);
    expect(blocks.map((b) => b.id.split('.cw-')[1])).toEqual(rawCrane.machine.counterweight.blocks.slice(0, 9).map((b) => b.id));
    blocks.forEach((b, i) => expect(mustComeAfter(er, b.id, i === 0 ? 'er-upper.mast' : blocks[i - 1].id), b.id).toBe(true));
    expect(mustComeAfter(er, 'er-upper.cw-count', blocks[blocks.length - 1].id)).toBe(true);
  });

  it('each assist lift is checked just before it is made, in the planned order', () => {
    const lifts = stage(er, 'er-assist-lifts');
    expect(lifts.steps.map((s) => s.id)).toEqual(['er-assist-lifts.radio-check', 'er-assist-lifts.check-1', 'er-assist-lifts.lift-1', 'er-assist-lifts.check-2', 'er-assist-lifts.lift-2']);
    // Each lift after its own check (and the stage's radio check); each check after the lift before.
    expect(step(er, 'er-assist-lifts.lift-1').after).toEqual(['er-assist-lifts.check-1', 'er-assist-lifts.radio-check']);
    expect(step(er, 'er-assist-lifts.check-2').after).toEqual(['er-assist-lifts.lift-1']);
    expect(step(er, 'er-assist-lifts.lift-2').after).toEqual(['er-assist-lifts.check-2', 'er-assist-lifts.radio-check']);
  });

  it('in taking down: ground, blocking and a fresh wind reading before the boom comes down, the hook block landed on the way', () => {
    for (const first of ['dm-lower.ground', 'dm-lower.blocking', 'dm-lower.wind', 'dm-lower.tip-support']) expect(mustComeAfter(dm, 'dm-lower.land-hook', first), first).toBe(true);
    expect(mustComeAfter(dm, 'dm-lower.lower', 'dm-lower.land-hook')).toBe(true);
    expect(stage(dm, 'dm-lower').hold?.instruction).toMatch(/hook block is landed/);
  });
});

describe('what the templates add, read as a practitioner would', () => {
  const cfg60 = withAssist({ boomLengthM: 60 });
  const er = plan('erection', cfg60);
  const dm = plan('dismantling', cfg60);
  const a60 = arrangementOf(60);

  it('the boom foot pins are a step of their own and are counted in the pin count', () => {
    const foot = pinsOf(a60.sectionTypeIds[0]);
    const joints = a60.sectionTypeIds.slice(1).reduce((n, t) => n + pinsOf(t), 0);
    const guys = a60.guyLines.reduce((n, g) => n + g.quantity * g.pinsEach, 0);
    // 60 m: foot 4; joints 6 × 4 = 24; guy lines GT 2×2 + G12 6×1 + G6 2×1 + G3 2×1 + GB 2×1 = 16.
    expect([foot, joints, guys]).toEqual([4, 24, 16]);
    expect(step(er, 'er-joints.foot').text).toContain(`fit the foot pins: ${foot} pins`);
    expect(step(er, 'er-check.pins').text).toContain(`${foot + joints + guys} in all: ${foot} at the boom foot, ${joints} in the joints and ${guys} in the guy lines`);
    expect(stage(er, 'er-joints').hold?.instruction).toContain(`The boom foot (${foot} pins) and all 6 joints (${joints} pins)`);
    expect(stage(er, 'er-joints').hold?.instruction).toContain(`${foot + joints} pins in all`);
    expect(er.briefing.sections[0].items[0]).toContain(`${foot + joints + guys} connecting pins: ${foot} at the boom foot`);
  });

  it('the mast, the backstops after the boom foot, and the bridle after every guy line', () => {
    expect(step(er, 'er-upper.mast').text).toMatch(/Raise the mast.*6\.5 t in the crane data/);
    expect(mustComeAfter(er, 'er-joints.backstops', 'er-joints.foot')).toBe(true);
    for (const line of stage(er, 'er-guys').steps.filter((s) => s.id.includes('.line-'))) expect(mustComeAfter(er, 'er-guys.bridle', line.id), line.id).toBe(true);
    expect(stage(er, 'er-guys').hold?.instruction).toMatch(/bridle is connected/);
  });

  it('counterweight with the backward-stability caution: no travel or slew with counterweight on and too little boom', () => {
    const caution = stage(er, 'er-upper').cautions.join(' ');
    expect(caution).toMatch(/Backward stability/);
    expect(caution).toMatch(/No travel and no slew with counterweight on until the boom the manual asks for is pinned/);
    expect(stage(dm, 'dm-counterweight').cautions.join(' ')).toMatch(/Backward stability/);
  });

  it('the joint and guy-pin holds are mandatory and count pins and keepers', () => {
    for (const id of ['er-joints', 'er-guys']) {
      expect(stage(er, id).hold?.mandatory, id).toBe(true);
      expect(stage(er, id).hold?.instruction, id).toMatch(/keeper/);
    }
    expect(stage(er, 'er-guys').hold?.instruction).toContain('16 pins on 14 lines');
  });

  it('the configuration hold checks the crane itself, not only the screen', () => {
    const config = stage(er, 'er-config');
    expect(config.hold?.mandatory).toBe(true);
    expect(config.hold?.instruction).toMatch(/the crane itself: the counterweight blocks, the parts of line and the hook block/);
    expect(step(er, 'er-config.cw-blocks').text).toMatch(/At the crane, not on the screen: count the counterweight blocks on the crane \(9 blocks, 95 t planned\)/);
    expect(step(er, 'er-config.parts').text).toMatch(/not on the screen: count the parts of line \(planned: 6\)/);
    expect(step(er, 'er-config.hook-block').records).toMatchObject({ kind: 'serial', componentKind: 'hook_block', typeId: 'HB120' });
  });

  it('a mandatory hold for the assist crane’s set-up gates its lifts and the component check', () => {
    const assist = stage(er, 'er-assist');
    expect(assist.hold?.mandatory).toBe(true);
    expect(assist.steps.map((s) => s.text).join(' ')).toMatch(/as chart “boom-20\.5m-full-cw” is written/);
    expect(assist.steps.map((s) => s.text).join(' ')).toMatch(/outriggers fully out.*ground that has been checked/);
    expect(assist.steps.map((s) => s.text).join(' ')).toMatch(/limiter set to the set-up of chart/);
    expect(stage(er, 'er-assist-lifts').dependsOn).toEqual(['er-assist']);
    expect(stage(er, 'er-check').dependsOn).toContain('er-assist');
    expect(stage(dm, 'dm-assist').hold?.mandatory).toBe(true);
  });

  it('the component check covers wire ropes, wedge sockets, sheaves and the over-hoist switch', () => {
    const texts = stage(er, 'er-check').steps.map((s) => s.text).join('\n');
    expect(texts).toMatch(/wire ropes of the boom hoist and the main hoist: no broken wires/);
    expect(texts).toMatch(/wedge socket: the live line runs in line with the socket pin.*tail is as long as the manual says and clamped as the manual says/);
    expect(texts).toMatch(/Inspect the sheaves/);
    expect(texts).toMatch(/over-hoist switch and its weight/);
    const aux = plan('erection', withAssist({ boomLengthM: 60, auxiliary: { enabled: true, hookBlockId: 'BALL12' } }));
    expect(step(aux, 'er-check.ropes').text).toContain('boom hoist, the main hoist and the auxiliary hoist');
  });

  it('dismantling: blocking under both sides of every joint, the mast onto its rest', () => {
    for (let n = 1; n <= a60.sectionTypeIds.length - 1; n += 1) {
      expect(step(dm, `dm-support-${n}.blocking`).text).toMatch(new RegExp(`Blocking under both sides of joint ${n}: under the end of position ${n} .* and under the end of position ${n + 1} `));
      expect(stage(dm, `dm-support-${n}`).hold?.title).toBe(`Joint ${n} blocked on both sides`);
    }
    expect(step(dm, 'dm-mast.lower').text).toMatch(/mast .* onto its rest/);
    expect(stage(dm, 'dm-mast').dependsOn).toEqual(['dm-guys']);
  });
});

describe('generated text', () => {
  const typed = withAssist({
    boomLengthM: 60,
    siteHazards: { powerLines: [], buriedServices: 'None in yard 2.', neighbours: 'Workshop doors kept shut during the raise.', loadAndTagLineAllowanceM: 3, swayAllowanceM: 2 },
  } as Parameters<typeof withAssist>[0]);

  it('no doubled full stop anywhere, even where what people typed ends its own sentence', () => {
    for (const kind of ['erection', 'dismantling'] as const) {
      const p = plan(kind, typed);
      const texts = [...p.stages.flatMap((s) => [s.title, s.summary, ...s.cautions, ...s.steps.flatMap((st) => [st.text, st.caution ?? '']), s.hold?.instruction ?? '']), ...p.briefing.sections.flatMap((s) => s.items)];
      const doubled = texts.filter((t) => /[^.]\.\.(?!\.)/.test(t) || /[!?]\./.test(t));
      expect(doubled).toEqual([]);
      // The typed sentences are there, once.
      expect(texts.join('\n')).toContain('None in yard 2.');
      expect(texts.join('\n')).toContain('as agreed at the briefing.');
    }
  });

  it('“an 18 m boom”, never “a 18 m boom”; “a 60 m boom” stays', () => {
    for (const kind of ['erection', 'dismantling'] as const) {
      const at18 = JSON.stringify(plan(kind, config()));
      expect(at18).not.toMatch(/\ba 18 m/);
      expect(at18).toMatch(/\ban 18 m boom/);
      expect(plan(kind, config()).briefing.title).toMatch(/of an 18 m boom$/);
      expect(JSON.stringify(plan(kind, config({ boomLengthM: 84 })))).not.toMatch(/\ba 84 m/);
      expect(JSON.stringify(plan(kind, config({ boomLengthM: 60 })))).toMatch(/\ba 60 m boom/);
    }
  });

  it('dismantling texts never talk of erection or an erection record', () => {
    for (const L of [18, 60, 90]) expect(JSON.stringify(plan('dismantling', withAssist({ boomLengthM: L })))).not.toMatch(/erect/i);
  });

  it('the plan never calls anyone “a person not in the crew list”; a director without a call sign is said to have none', () => {
    const STRANGER = '99999999-9999-4999-8999-999999999999';
    const odd: CommsPlan = { ...comms, motionSignallers: [{ motion: 'boom hoist', userId: STRANGER }, { motion: 'main hoist', userId: BEN }], callSigns: comms.callSigns.filter((c) => c.userId !== BEN) };
    for (const kind of ['erection', 'dismantling'] as const) {
      const text = JSON.stringify(plan(kind, config(), undefined, odd));
      expect(text).not.toMatch(/not in the crew list/);
      expect(text).toContain('boom hoist: someone with no call sign yet');
      expect(text).toContain('main hoist: Ben Lusk (no call sign yet)');
    }
  });
});

describe('commsProblems: every motion directed by a crew member with a call sign', () => {
  const crew = [
    { userId: ANN, role: 'supervisor' as const },
    { userId: BEN, role: 'operator' as const },
    { userId: CAL, role: 'signaller' as const },
  ];
  const all = (userId: string): CommsPlan['motionSignallers'] => motions.map((motion) => ({ motion, userId }));

  it('flags each motion of the job nobody directs, and only the motions the job has', () => {
    const problems = commsProblems(config(), comms, crew);
    // 18 m without auxiliary hoist or assist crane: boom hoist and main hoist assigned; swing and travel are not.
    expect(problems.map((p) => p.code)).toEqual(['comms_motion_unassigned', 'comms_motion_unassigned']);
    expect(problems.map((p) => p.message).join(' ')).toMatch(/Nobody directs the swing.*Nobody directs the travel/);
    expect(commsProblems(withAssist({ auxiliary: { enabled: true, hookBlockId: 'BALL12' } }), { ...comms, motionSignallers: all(CAL).filter((m) => m.motion !== 'assist crane') }, crew).map((p) => p.message)).toEqual([
      expect.stringMatching(/^Nobody directs the assist crane/),
    ]);
  });

  it('flags a director without a call sign, or one who is not in the crew (a viewer does not count)', () => {
    const noCallSign = { ...comms, callSigns: comms.callSigns.filter((c) => c.userId !== CAL), motionSignallers: all(CAL) };
    expect(commsProblems(config(), noCallSign, crew).map((p) => p.code)).toEqual(['comms_motion_no_call_sign', 'comms_motion_no_call_sign', 'comms_motion_no_call_sign', 'comms_motion_no_call_sign']);
    const viewerOnly = crew.map((c) => (c.userId === CAL ? { ...c, role: 'viewer' as const } : c));
    expect(commsProblems(config(), { ...comms, motionSignallers: all(CAL) }, viewerOnly)).toHaveLength(4);
    expect(commsProblems(config(), { ...comms, motionSignallers: all(CAL) }, crew)).toEqual([]);
  });
});
