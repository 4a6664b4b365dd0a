// The plan validator keeps mandatory holds where they belong: every stage and step a mandatory hold
// gated in the generated plan still waits for it, required steps stay in their stage, the
// generated in-stage order stays, readings stay held to what the plan says. Hand-edited drafts and
// revisions on the live board go through the same function (planProblems), and a revision is also
// checked against the version in force (revisionProblems).
import { describe, expect, it } from 'vitest';
import { MANDATORY_PROBLEM_CODES, planProblems, protectsMandatoryHold, revisionProblems } from '../../../shared/plan';
import type { Plan, PlanStep } from '../../../shared/schemas/plan';
import { plan, stage, step, withAssist } from './plan-fixtures';

const reference = plan('erection', withAssist({ boomLengthM: 60 }));
const dmReference = plan('dismantling', withAssist({ boomLengthM: 60 }));
const edit = (change: (p: Plan) => void, from: Plan = reference): Plan => {
  const p = structuredClone(from);
  change(p);
  return p;
};
const problemsOf = (p: Plan, ref: Plan = reference) => planProblems(p, ref);
const codes = (p: Plan, ref: Plan = reference) => problemsOf(p, ref).map((x) => x.code);
const removeStep = (p: Plan, id: string) => {
  for (const s of p.stages) s.steps = s.steps.filter((st) => st.id !== id);
};

describe('a mandatory hold keeps gating every stage it gated', () => {
  it('the raise stage rewired to depend only on the ground stage is refused, naming each hold it would bypass and what it protects', () => {
    const rewired = edit((p) => {
      stage(p, 'er-raise').dependsOn = ['er-ground'];
    });
    const problems = problemsOf(rewired);
    expect(problems.length).toBeGreaterThan(0);
    expect(problems.every((x) => x.code === 'mandatory_hold_bypassed')).toBe(true);
    expect(problems.every(protectsMandatoryHold)).toBe(true);
    const text = problems.map((x) => x.message).join('\n');
    // Every mandatory hold between the ground and the raise in the generated plan.
    for (const hold of ['Assist crane set up as its chart', 'Every joint pinned', 'Guy-line pins counted', 'Boom hoist stopped and locked, tip still on the ground', 'Configuration checked against the plan', 'Ready to raise']) {
      expect(text).toContain(`Stage “Raise and test” no longer waits for the mandatory hold “${hold}”`);
    }
    // Named where the gating breaks: the raise stage, not the hand-over that waits for it.
    const raiseAt = rewired.stages.findIndex((s) => s.id === 'er-raise');
    expect(new Set(problems.map((x) => x.path))).toEqual(new Set([`stages.${raiseAt}.dependsOn`]));
    expect(problems).toHaveLength(6);
  });

  it('a stage put in between keeps the gating; waiting for a later stage than before is allowed too', () => {
    const between = edit((p) => {
      const extra = { ...structuredClone(stage(p, 'er-preraise')), id: 'er-extra', title: 'Extra walk round', dependsOn: ['er-preraise'], hold: null };
      extra.steps = [{ id: 'er-extra.walk', text: 'Walk round the crane once more.', allowedRoles: ['supervisor'], requiresPhoto: false, records: null, caution: null, required: false, after: [] }];
      p.stages.splice(p.stages.findIndex((s) => s.id === 'er-raise'), 0, extra);
      stage(p, 'er-raise').dependsOn = ['er-extra'];
    });
    expect(problemsOf(between)).toEqual([]);
    const later = edit((p) => {
      stage(p, 'er-tip').dependsOn = ['er-joints', 'er-guys'];
    });
    expect(problemsOf(later)).toEqual([]);
  });

  it('a stage added by hand must wait at least for the site hold', () => {
    const added = (dependsOn: string[]) =>
      edit((p) => {
        p.stages.push({ ...structuredClone(stage(p, 'er-tip')), id: 'er-added', title: 'Extra lift of the tip', dependsOn, hold: null, steps: [] });
      });
    expect(problemsOf(added([])).map((x) => x.message)).toEqual([expect.stringMatching(/^The added stage “Extra lift of the tip” does not wait for the mandatory hold “Ground, exclusion zone and communications accepted”/)]);
    expect(problemsOf(added(['er-ground']))).toEqual([]);
  });

  it('guy lines pinned before the joints hold is released is refused', () => {
    const early = edit((p) => {
      stage(p, 'er-guys').dependsOn = ['er-guy-layout'];
    });
    expect(problemsOf(early).map((x) => x.message)).toEqual([expect.stringMatching(/^Stage “Guy lines pinned” no longer waits for the mandatory hold “Every joint pinned”/)]);
  });

  it('dismantling: a joint whose pins no longer wait for its blocking hold is refused', () => {
    const early = edit((p) => {
      stage(p, 'dm-joint-3').dependsOn = ['dm-guys'];
    }, dmReference);
    const messages = problemsOf(early, dmReference).map((x) => x.message);
    expect(messages[0]).toMatch(/^Stage “Draw the pins of joint 3” no longer waits for the mandatory hold “Joint 3 blocked on both sides” of stage “Block joint 3/);
    // Tip first: joint 3 also jumps the holds of joints 6 to 4 (blocked, and apart), and only it is named.
    expect(messages).toHaveLength(1 + 3 * 2);
    expect(messages.every((m) => m.startsWith('Stage “Draw the pins of joint 3”'))).toBe(true);
  });

  it('a stage that can never start (waiting for an unknown stage) bypasses nothing: only the unknown dependency is reported', () => {
    const unknown = edit((p) => {
      stage(p, 'er-raise').dependsOn = ['no-such-stage'];
    });
    expect(codes(unknown)).toEqual(['unknown_dependency', 'unreachable']);
  });

  it('a step moved out from behind a hold is refused; a hold moved to another stage is refused', () => {
    const moved = edit((p) => {
      const raise = stage(p, 'er-raise');
      const st = raise.steps.find((s) => s.id === 'er-raise.raise') as PlanStep;
      raise.steps = raise.steps.filter((s) => s !== st);
      for (const s of raise.steps) s.after = (s.after ?? []).map((a) => (a === 'er-raise.raise' ? 'er-raise.stop-check' : a));
      stage(p, 'er-upper').steps.push({ ...st, after: [] });
    });
    const problems = problemsOf(moved);
    expect(problems.map((x) => x.code)).toContain('mandatory_hold_bypassed');
    expect(problems.map((x) => x.message).join('\n')).toMatch(/Step “On signal, raise the boom the rest of the way, slowly, to working angle.” was moved to stage “Crawlers, mast and counterweight”, which does not wait for the mandatory hold “Ready to raise”/);

    // Into the pre-raise stage itself: done before its own hold is released, so still in front of it.
    const intoPreRaise = edit((p) => {
      const raise = stage(p, 'er-raise');
      const st = raise.steps.find((s) => s.id === 'er-raise.raise') as PlanStep;
      raise.steps = raise.steps.filter((s) => s !== st);
      for (const s of raise.steps) s.after = (s.after ?? []).map((a) => (a === 'er-raise.raise' ? 'er-raise.stop-check' : a));
      stage(p, 'er-preraise').steps.push({ ...st, after: [] });
    });
    expect(problemsOf(intoPreRaise).map((x) => x.message)).toEqual([expect.stringMatching(/was moved to stage “Pre-raise checks”, which does not wait for the mandatory hold “Ready to raise”/)]);

    const holdMoved = edit((p) => {
      stage(p, 'er-handover').hold = stage(p, 'er-preraise').hold;
      stage(p, 'er-preraise').hold = null;
    });
    expect(problemsOf(holdMoved).map((x) => x.message).join('\n')).toMatch(/The mandatory hold “Ready to raise” belongs to stage “Pre-raise checks” and was moved to stage “Post-assembly inspection and hand-over”/);
  });
});

describe('required steps stay, in their stage', () => {
  it('deleting the pre-raise wind step is refused, naming the hold it protects', () => {
    const p = edit((x) => removeStep(x, 'er-preraise.wind'));
    const problems = problemsOf(p);
    expect(problems.map((x) => x.code)).toEqual(['required_step_removed']);
    expect(problems[0].message).toMatch(/^The step “Read the wind on site\. Limit for raising a 60 m boom: gust \d+(\.\d+)? m\/s, mean \d+(\.\d+)? m\/s\. Record the gust\.” was removed\. It protects the mandatory hold “Ready to raise” of stage “Pre-raise checks”\./);
    expect(protectsMandatoryHold(problems[0])).toBe(true);
  });

  it('moving a required step to another stage is refused; removing an ordinary step is allowed', () => {
    const moved = edit((p) => {
      const pre = stage(p, 'er-preraise');
      const wind = pre.steps.find((s) => s.id === 'er-preraise.wind') as PlanStep;
      pre.steps = pre.steps.filter((s) => s !== wind);
      stage(p, 'er-raise').steps.push(wind);
    });
    expect(problemsOf(moved).map((x) => x.code)).toEqual(['required_step_removed']);
    expect(problemsOf(moved)[0].message).toMatch(/was moved out of stage “Pre-raise checks”/);
    expect(codes(edit((p) => removeStep(p, 'er-preraise.assist-arms')))).toEqual([]);
  });

  it('a required step of a dismantling joint (the blocking) cannot be deleted', () => {
    const p = edit((x) => removeStep(x, 'dm-support-2.blocking'), dmReference);
    expect(problemsOf(p, dmReference).map((x) => x.message)).toEqual([expect.stringMatching(/^The step “Blocking under both sides of joint 2.*was removed\. It protects the mandatory hold “Joint 2 blocked on both sides”/)]);
  });
});

describe('in-stage order', () => {
  it('the hand-over losing its order after the examination is refused', () => {
    const p = edit((x) => {
      step(x, 'er-handover.handover').after = [];
    });
    const problems = problemsOf(p);
    expect(problems.map((x) => x.code)).toEqual(['step_order', 'step_order']);
    expect(problems[0].message).toMatch(/must come after “A competent person makes the thorough examination/);
    // Through another step is enough: examination → record → handover keeps the order.
    expect(codes(edit((x) => { step(x, 'er-handover.handover').after = ['er-handover.record']; }))).toEqual([]);
  });

  it('an order naming a step of another stage, the step itself, or a circle is refused even without a reference', () => {
    const other = edit((x) => { step(x, 'er-tension.look').after = ['er-reeve.block']; });
    expect(planProblems(other, null).map((x) => x.message)).toEqual([expect.stringMatching(/waits for a step of stage “Main hoist reeving”/)]);
    const self = edit((x) => { step(x, 'er-tension.look').after = ['er-tension.look']; });
    expect(planProblems(self, null).map((x) => x.message)).toEqual([expect.stringMatching(/waits for itself/)]);
    const circle = edit((x) => { step(x, 'er-tension.clear').after = ['er-tension.look']; });
    expect(planProblems(circle, null).map((x) => x.message)).toEqual([expect.stringMatching(/wait for each other in a circle/)]);
  });

  it('an order to a step that was removed is no problem: removing an ordinary step leaves the others free', () => {
    // er-reeve.count, over-hoist and socket come after pay-out; pay-out is not required.
    expect(codes(edit((x) => removeStep(x, 'er-reeve.pay-out')))).toEqual([]);
  });
});

describe('what a reading is held to cannot be loosened', () => {
  const withCheck = (id: string, check: NonNullable<PlanStep['records']>['check']) =>
    edit((x) => {
      const st = step(x, id);
      if (st.records) st.records.check = check;
    });

  it('changing the planned parts of line, loosening the slope limit, removing a check or changing the wind phase is refused', () => {
    expect(codes(withCheck('er-config.parts', { kind: 'plan', planned: 5, tolerance: 0, source: 'edited' }))).toEqual(['check_weakened']);
    expect(codes(withCheck('er-reeve.count', { kind: 'plan', planned: 6, tolerance: 1, source: 'edited' }))).toEqual(['check_weakened']);
    expect(codes(withCheck('er-upper.level', { kind: 'max', limit: 2, source: 'edited' }))).toEqual(['check_weakened']);
    expect(codes(withCheck('er-joints.joint-2', null))).toEqual(['check_weakened']);
    expect(codes(withCheck('er-preraise.wind', { kind: 'wind', phase: 'assembly' }))).toEqual(['check_weakened']);
    expect(problemsOf(withCheck('er-config.parts', { kind: 'plan', planned: 5, tolerance: 0, source: 'edited' }))[0].message).toMatch(/no longer held to the plan’s figure 6 \(configuration: hook block HB120 on 6 parts of line\)/);
  });

  it('a stricter check is allowed', () => {
    expect(codes(withCheck('er-upper.level', { kind: 'max', limit: 0.5, source: 'site rule' }))).toEqual([]);
    expect(codes(withCheck('er-raise.limiter', { kind: 'min', limit: 3, source: 'site rule' }))).toEqual([]);
  });
});

describe('what the board and the plan editor call', () => {
  it('the codes that weaken a mandatory hold, for a 409 refusal', () => {
    expect([...MANDATORY_PROBLEM_CODES].sort()).toEqual(['boom_movement_undeclared', 'mandatory_hold_bypassed', 'mandatory_hold_removed', 'mandatory_role_removed', 'required_step_removed']);
    expect(protectsMandatoryHold({ code: 'check_weakened' })).toBe(false);
    expect(protectsMandatoryHold({ code: 'cycle' })).toBe(false);
  });

  it('a revision is checked against the version in force as well: a step that version made required stays', () => {
    const current = edit((p) => {
      step(p, 'er-preraise.assist-arms').required = true;
    });
    const next = edit((p) => removeStep(p, 'er-preraise.assist-arms'));
    expect(planProblems(next, reference)).toEqual([]);
    expect(revisionProblems(next, reference, current).map((x) => x.code)).toEqual(['required_step_removed']);
    expect(revisionProblems(reference, reference, reference)).toEqual([]);
  });

  it('the generated plans of both kinds pass against themselves', () => {
    expect(planProblems(reference, reference)).toEqual([]);
    expect(planProblems(dmReference, dmReference)).toEqual([]);
  });
});

describe('stages that move the boom say so, and keep saying so (common practice, no source: the wind rules hang on it)', () => {
  it('the generated raise and lowering stages declare that they move the boom, the pre-raise checks that they ready it', () => {
    expect(stage(reference, 'er-raise').boom).toBe('moves');
    expect(stage(reference, 'er-preraise').boom).toBe('prepares');
    expect(stage(dmReference, 'dm-lower').boom).toBe('moves');
  });

  it('an edit that drops the declaration is refused: the fresh wind reading would no longer apply', () => {
    const dropped = edit((p) => {
      delete stage(p, 'er-raise').boom;
    });
    const problems = problemsOf(dropped).filter((x) => x.code === 'boom_movement_undeclared');
    expect(problems).toHaveLength(1);
    expect(problems[0].message).toContain('Stage “Raise and test” raises or lowers the boom');
    expect(protectsMandatoryHold(problems[0])).toBe(true);
  });
});
