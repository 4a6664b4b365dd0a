// The order a crew must keep, checked on every plan the demo fleet can generate: every boom length
// the invented crane model lists (server/demo/data/crane-model.json), erection and dismantling,
// with and without the auxiliary hoist and the assist crane. Counts come from the raw JSON, read
// apart from the generator. The trade rules (common practice, no source; the manufacturer's
// manual governs): guy lines are pinned only to a boom whose joints are all pinned; nobody reeves
// while the guy lines are drawn taut, so reeving and tensioning never run side by side; in taking
// down, blocking goes under both sides of a joint before any of its pins is drawn.
import { describe, expect, it } from 'vitest';
import { planProblems } from '../../../shared/plan';
import type { Configuration } from '../../../shared/schemas/configuration';
import type { Plan } from '../../../shared/schemas/plan';
import { ancestors, config, listedLengths, mustComeAfter, plan, rawCrane, stage, withAssist } from './plan-fixtures';

/** The configurations of the demo fleet: each listed length plain, and with auxiliary hoist (where the data allows it) and assist crane. */
function fleetConfigurations(): [string, Configuration][] {
  const auxLengths = new Set((rawCrane as unknown as { auxSheaveBoomLengthsM: number[] }).auxSheaveBoomLengthsM);
  return listedLengths.flatMap((L): [string, Configuration][] => [
    [`${L} m`, config({ boomLengthM: L })],
    [
      `${L} m with assist crane${auxLengths.has(L) ? ' and auxiliary hoist' : ''}`,
      withAssist({ boomLengthM: L, auxiliary: auxLengths.has(L) ? { enabled: true, hookBlockId: 'BALL12' } : { enabled: false, hookBlockId: null } }),
    ],
  ]);
}

const arrangementOf = (lengthM: number) => {
  const a = rawCrane.arrangements.find((x) => x.boomLengthM === lengthM);
  if (!a) throw new Error(`${lengthM} m is not listed`);
  return a;
};

/** Why an erection plan breaks the order rules; empty when it keeps them. */
function erectionOrderFaults(p: Plan, lengthM: number): string[] {
  const faults: string[] = [];
  const a = arrangementOf(lengthM);
  const all = p.stages.flatMap((s) => s.steps);
  // The boom foot and every joint: one pinning step per section of the listed arrangement.
  const jointSteps = all.filter((s) => /^er-joints\.(foot|joint-\d+)$/.test(s.id));
  if (jointSteps.length !== a.sectionTypeIds.length) faults.push(`${jointSteps.length} joint pinning steps, the data has ${a.sectionTypeIds.length} sections`);
  // Guy-line pinning: the steps that record the pins of a line (laying out records a serial).
  const guyPins = all.filter((s) => s.id.includes('.line-') && s.records?.kind === 'reading');
  const lines = a.guyLines.reduce((n, g) => n + g.quantity, 0);
  if (guyPins.length !== lines) faults.push(`${guyPins.length} guy-line pinning steps, the data has ${lines} lines`);
  for (const g of guyPins) for (const j of jointSteps) if (!mustComeAfter(p, g.id, j.id)) faults.push(`${g.id} may be done before ${j.id}`);
  // Reeving and tensioning: one must wait for the other, directly or not.
  const tension = p.stages.find((s) => s.id === 'er-tension');
  if (!tension) faults.push('no tensioning stage');
  for (const reeve of p.stages.filter((s) => s.id === 'er-reeve' || s.id === 'er-aux')) {
    if (tension && !ancestors(p, reeve.id).has(tension.id) && !ancestors(p, tension.id).has(reeve.id)) faults.push(`${reeve.id} can run beside ${tension.id}`);
  }
  return faults;
}

/** Why a dismantling plan breaks the order rules; empty when it keeps them. */
function dismantlingOrderFaults(p: Plan, lengthM: number): string[] {
  const faults: string[] = [];
  const joints = arrangementOf(lengthM).sectionTypeIds.length - 1;
  for (let n = 1; n <= joints; n += 1) {
    const blocking = `dm-support-${n}.blocking`;
    const pins = `dm-joint-${n}.pins`;
    if (!p.stages.some((s) => s.steps.some((st) => st.id === blocking))) {
      faults.push(`no blocking step for joint ${n}`);
      continue;
    }
    if (!mustComeAfter(p, pins, blocking)) faults.push(`${pins} may be done before ${blocking}`);
    // And a mandatory hold stands between them: the blocking is seen before any pin is touched.
    if (!stage(p, `dm-support-${n}`).hold?.mandatory) faults.push(`no mandatory hold after ${blocking}`);
  }
  for (const line of p.stages.flatMap((s) => s.steps).filter((s) => s.id.startsWith('dm-guys.line-'))) {
    if (!mustComeAfter(p, line.id, 'dm-slacken.lock')) faults.push(`${line.id} may be unpinned before the boom hoist is locked`);
  }
  return faults;
}

describe('order on every plan of the demo fleet', () => {
  const cases = fleetConfigurations();

  it('covers every listed boom length of the demo crane', () => {
    expect(listedLengths.length).toBeGreaterThanOrEqual(15);
    expect(cases).toHaveLength(listedLengths.length * 2);
  });

  it.each(cases)('%s, erection: guy lines pinned after every joint; reeving never beside tensioning; no plan problem', (_name, cfg) => {
    const p = plan('erection', cfg);
    expect(erectionOrderFaults(p, cfg.boomLengthM)).toEqual([]);
    expect(planProblems(p, p)).toEqual([]);
  });

  it.each(cases)('%s, dismantling: blocking on both sides before the pins of each joint; no plan problem', (_name, cfg) => {
    const p = plan('dismantling', cfg);
    expect(dismantlingOrderFaults(p, cfg.boomLengthM)).toEqual([]);
    expect(planProblems(p, p)).toEqual([]);
  });
});

describe('the order checks catch a plan that breaks the rules', () => {
  const cfg = withAssist({ boomLengthM: 60 });
  const rewire = (kind: Plan['kind'], change: (p: Plan) => void): Plan => {
    const p = plan(kind, cfg);
    change(p);
    return p;
  };

  it('reeving waiting only for the tip (the old wiring) runs beside tensioning', () => {
    const p = rewire('erection', (x) => {
      stage(x, 'er-reeve').dependsOn = ['er-tip'];
    });
    expect(erectionOrderFaults(p, 60)).toEqual(['er-reeve can run beside er-tension']);
  });

  it('guy lines pinned while the sections are pinned (waiting only for the lay-out) are caught, line by line', () => {
    const p = rewire('erection', (x) => {
      stage(x, 'er-guys').dependsOn = ['er-guy-layout'];
    });
    const faults = erectionOrderFaults(p, 60);
    // 14 lines at 60 m (GT 2, G12 6, G6 2, G3 2, GB 2) times 7 pinning steps (foot and 6 joints).
    expect(faults).toHaveLength(14 * 7);
    expect(faults[0]).toMatch(/^er-guys\.line-GT-1 may be done before er-joints\.foot$/);
  });

  it('a joint whose pins wait only for the guy lines, not for its blocking, is caught', () => {
    const p = rewire('dismantling', (x) => {
      stage(x, 'dm-joint-3').dependsOn = ['dm-guys'];
    });
    expect(dismantlingOrderFaults(p, 60)).toEqual(['dm-joint-3.pins may be done before dm-support-3.blocking']);
  });
});
