import { describe, expect, it } from 'vitest';
import { comparePlans } from '../../../shared/plan/compare.js';
import { plan, stage, step } from './small-plan.js';

describe('comparing two versions', () => {
  it('finds added, removed and changed steps and stages by id and text', () => {
    const older = plan();
    const newer = plan();
    // Step text changed, a step removed, a step added, a step's roles changed.
    newer.stages[1].steps[0].text = 'Set the crawler gauge to 7 m';
    newer.stages[1].steps.splice(1, 1);
    newer.stages[2].steps.push(step('custom-1', 'Photograph every keeper'));
    newer.stages[0].steps[0].allowedRoles = ['rigger', 'supervisor'];
    // A stage added, one removed is simulated by a new one in place of laydown's id.
    newer.stages.push(stage('custom-stage', { title: 'Extra check', dependsOn: ['laydown'], steps: [] }));
    newer.stages[1].hold = null;

    const c = comparePlans(older, newer);

    expect(c.same).toBe(false);
    expect(c.steps.added.map((s) => s.stepId)).toEqual(['custom-1']);
    expect(c.steps.added[0].stageTitle).toBe('Stage laydown');
    expect(c.steps.removed.map((s) => s.stepId)).toEqual(['upper.b']);
    expect(c.steps.removed[0].text).toBe('Fit counterweight');
    expect(c.steps.changed).toEqual([
      { stepId: 'ground.a', stageTitle: 'Stage ground', text: 'First step of ground', what: ['roles'] },
      { stepId: 'upper.a', stageTitle: 'Stage upper', text: 'Set the crawler gauge to 7 m', before: 'Set the gauge', what: ['text'] },
    ]);
    expect(c.stages.added.map((s) => s.stageId)).toEqual(['custom-stage']);
    expect(c.stages.removed).toEqual([]);
    expect(c.stages.changed).toEqual([{ stageId: 'upper', title: 'Stage upper', what: ['hold removed'] }]);
  });

  it('finds a removed stage and a moved one, and nothing in two equal plans', () => {
    const older = plan();
    const newer = plan();
    expect(comparePlans(older, newer).same).toBe(true);

    newer.stages.splice(1, 1);
    newer.stages.reverse();
    const c = comparePlans(older, newer);
    expect(c.stages.removed.map((s) => s.stageId)).toEqual(['upper']);
    expect(c.steps.removed.map((s) => s.stepId)).toEqual(['upper.a', 'upper.b']);
    // Both remaining stages swapped places: each is marked as moved.
    expect(c.stages.changed.map((s) => [s.stageId, s.what])).toEqual([
      ['laydown', ['place in the order']],
      ['ground', ['place in the order']],
    ]);
  });

  it('marks a step that moved to another stage', () => {
    const older = plan();
    const newer = plan();
    const [moved] = newer.stages[1].steps.splice(1, 1);
    newer.stages[2].steps.push(moved);
    const c = comparePlans(older, newer);
    expect(c.steps.changed).toEqual([{ stepId: 'upper.b', stageTitle: 'Stage laydown', text: 'Fit counterweight', what: ['stage'] }]);
    expect(c.steps.added).toEqual([]);
    expect(c.steps.removed).toEqual([]);
  });
});
