import { describe, expect, it } from 'vitest';
import { describeChange } from '../../../src/words/board';
import { actingLine, itemDoneWords, itemRolesWords, madeSafeHeadline, makingSafeLine, reopenedWords, startShiftLabel } from '../../../src/words/shift';
import { liveJob, people } from '../components/board/shift/shift-board';

/** The clock is the caller's (services/time.ts on screen, in the site's zone); a marker keeps the words checkable. */
const at = (iso: string) => `<${iso}>`;

describe('the shift words', () => {
  it('says MADE SAFE with the time of the last item, who did it and who ended the shift, only once the board holds it', () => {
    const job = liveJob();
    job.endShift();
    // While making safe there is no made-safe time to claim.
    expect(madeSafeHeadline(job.state, at)).toBe('MADE SAFE');
    const ended = job.state.shift!.makeSafe!.begunBy;
    expect(makingSafeLine(job.state, at)).toBe(`Shift 1 ended by Sue Marsh at <${ended.at}>. 0 of ${job.state.shift!.makeSafe!.items.length} items done.`);
    const board = job.tickAll();
    const last = board.shift!.makeSafe!.items.at(-1)!.doneBy!;
    expect(board.job.state).toBe('made_safe');
    expect(madeSafeHeadline(board, at)).toBe(`MADE SAFE at <${last.at}> — last item by ${last.name}, shift ended by Sue Marsh`);
    expect(startShiftLabel(board)).toBe('Hold to start shift 2');
  });

  it('words who may tick an item and who did, with the note', () => {
    const job = liveJob();
    job.endShift();
    const board = job.tickAll();
    const key = board.shift!.makeSafe!.items.find((i) => i.id === 'keyHeld')!;
    expect(itemRolesWords(key)).toBe('For supervisor');
    expect(itemDoneWords(key, at)).toBe(`Done by Sue Marsh (supervisor) at <${key.doneBy!.at}>: Key in the site office safe`);
    const hooks = board.shift!.makeSafe!.items.find((i) => i.id === 'hookBlocks')!;
    expect(itemRolesWords(hooks)).toBe('For rigger or operator');
  });

  it('names the acting supervisor, and the next one once the handover is acknowledged', () => {
    const job = liveJob();
    expect(actingLine(job.state)).toBe('Acting supervisor: Sue Marsh');
    job.apply('handover.written', { shift: 1, to: null, done: [], open: [], defects: [], overrides: [], hazards: 'Wind forecast to rise after 16:00', note: '' });
    const written = job.state.handovers!.at(-1)!;
    const before = job.state;
    const after = job.apply('handover.acknowledged', { handoverSeq: written.seq, from: { userId: people.sue.userId, name: people.sue.name } }, { by: people.ned });
    expect(actingLine(after)).toBe('Acting supervisor: Ned Orr');
    expect(describeChange(before, after)).toBe('Ned Orr is now the acting supervisor.');
    // A board from before shifts names nobody: the header says nothing rather than guess.
    expect(actingLine({})).toBeNull();
  });

  it('says on the hold why acknowledgments were taken back by a crew change, until the hold is released', () => {
    const job = liveJob();
    // Rita completes the ground stage's steps; the hold opens; she acknowledges, then leaves the crew.
    for (const s of job.state.stages[0].steps) job.apply('step.completed', { stageId: job.state.stages[0].id, stepId: s.id, value: s.records ? '0.5' : null, photoId: s.requiresPhoto ? 'a0a0a0a0-0000-4000-8000-0000000000f1' : null }, { by: people.rita });
    const holdId = job.state.stages[0].hold!.id;
    job.apply('hold.acknowledged', { stageId: job.state.stages[0].id, holdId, role: 'rigger' }, { by: people.rita });
    const board = job.apply('crew.set', { crew: [], withdrawn: [{ stageId: job.state.stages[0].id, holdId, userId: people.rita.userId, name: people.rita.name, role: 'rigger' }] });
    const hold = board.stages[0].hold!;
    expect(hold.acknowledgments).toEqual([]);
    expect(reopenedWords(hold, at)).toBe(`Acknowledgments taken back at <${hold.reopenedBecause!.at}>: Rita Venn left the crew or changed role. The roles named below acknowledge again.`);
    expect(reopenedWords({ ...hold, state: 'released' }, at)).toBeNull();
  });

  it('tells the crew the shift is ending, the job made safe and the next shift started, as facts', () => {
    const job = liveJob();
    const working = job.state;
    const ending = job.endShift();
    expect(describeChange(working, ending)).toBe('Shift ending on the board: making safe, no work.');
    const beforeLast = structuredClone(job.state);
    // Tick all but compare across the last tick only.
    const made = job.tickAll();
    expect(describeChange(beforeLast, made)).toContain('Job made safe on the board: shift 1 has ended.');
    const started = job.apply('shift.started', { shift: 2 }, { by: people.sue });
    expect(describeChange(made, started)).toBe('Shift 2 started on the board.');
  });
});
