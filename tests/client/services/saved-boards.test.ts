import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import type { BoardSnapshot } from '../../../shared/board/types';
import { clearSavedBoards, latestSavedBoard, readSavedBoard, rememberSavedView, saveBoard, SAVED_BOARDS_KEPT, savedBoardEntry } from '../../../src/services/saved-boards';
import { ageWords } from '../../../src/words/offline';

function board(jobId: string, seq: number): BoardSnapshot {
  return {
    seq,
    job: { id: jobId, name: `Job ${jobId}`, site: 'Riverside works', kind: 'erection', state: 'live', craneFleetNumber: 'CC-11', stop: null, lastResume: null, cancelReason: null },
    planVersion: 1,
    stages: [],
    crew: [{ userId: 'u-op', name: 'Ola Operator', role: 'operator' }],
    briefed: [],
    weather: null,
    windLimits: null,
    defects: [],
    presence: [],
  } as BoardSnapshot;
}

const who = { userId: 'u-op', userName: 'Ola Operator' };

describe('the boards kept on the device', () => {
  beforeEach(() => localStorage.clear());
  afterEach(() => vi.restoreAllMocks());

  it('reads back the board it saved, with when it was last live and who saw it', () => {
    saveBoard({ jobId: 'job-a', view: 'cab', liveAt: 1_000, ...who }, board('job-a', 7));
    const kept = readSavedBoard('job-a');
    expect(kept?.board.seq).toBe(7);
    expect(kept).toMatchObject({ jobId: 'job-a', view: 'cab', seq: 7, liveAt: 1_000, userId: 'u-op', userName: 'Ola Operator' });
    expect(readSavedBoard('job-b')).toBeNull();
  });

  it('moves only the small index while the seq stays, and rewrites the board when it moves', () => {
    saveBoard({ jobId: 'job-a', liveAt: 1_000, ...who }, board('job-a', 7));
    const setItem = vi.spyOn(localStorage, 'setItem');
    saveBoard({ jobId: 'job-a', liveAt: 16_000, ...who }, board('job-a', 7));
    expect(setItem.mock.calls.map(([key]) => key)).toEqual(['holdline.savedBoards']);
    expect(savedBoardEntry('job-a')?.liveAt).toBe(16_000);
    setItem.mockClear();
    saveBoard({ jobId: 'job-a', liveAt: 17_000, ...who }, board('job-a', 8));
    expect(setItem.mock.calls.map(([key]) => key)).toEqual(['holdline.savedBoard.job-a', 'holdline.savedBoards']);
    expect(readSavedBoard('job-a')?.board.seq).toBe(8);
    setItem.mockRestore();
  });

  it('never shows a board whose entry names another seq (a write cut half-way)', () => {
    saveBoard({ jobId: 'job-a', liveAt: 1_000, ...who }, board('job-a', 7));
    localStorage.setItem('holdline.savedBoard.job-a', JSON.stringify(board('job-a', 9)));
    expect(readSavedBoard('job-a')).toBeNull();
    localStorage.setItem('holdline.savedBoard.job-a', '{not json');
    expect(readSavedBoard('job-a')).toBeNull();
  });

  it('keeps the newest few jobs and drops the oldest board with its entry', () => {
    for (let i = 0; i <= SAVED_BOARDS_KEPT; i++) saveBoard({ jobId: `job-${i}`, liveAt: 1_000 + i, ...who }, board(`job-${i}`, 1));
    expect(readSavedBoard('job-0')).toBeNull();
    expect(localStorage.getItem('holdline.savedBoard.job-0')).toBeNull();
    for (let i = 1; i <= SAVED_BOARDS_KEPT; i++) expect(readSavedBoard(`job-${i}`)?.board.job.id).toBe(`job-${i}`);
    expect(latestSavedBoard()?.jobId).toBe(`job-${SAVED_BOARDS_KEPT}`);
  });

  it('a full storage gives up the other jobs’ boards for the open one, and never throws', () => {
    saveBoard({ jobId: 'job-a', liveAt: 1_000, ...who }, board('job-a', 1));
    const real = localStorage.setItem.bind(localStorage);
    let refusals = 1;
    const setItem = vi.spyOn(localStorage, 'setItem').mockImplementation((key: string, value: string) => {
      if (key === 'holdline.savedBoard.job-b' && refusals-- > 0) throw new DOMException('full', 'QuotaExceededError');
      real(key, value);
    });
    saveBoard({ jobId: 'job-b', liveAt: 2_000, ...who }, board('job-b', 3));
    expect(readSavedBoard('job-b')?.board.seq).toBe(3);
    expect(readSavedBoard('job-a')).toBeNull();
    // Refused for good: nothing kept, and the live board goes on.
    setItem.mockImplementation(() => {
      throw new DOMException('full', 'QuotaExceededError');
    });
    expect(() => saveBoard({ jobId: 'job-c', liveAt: 3_000, ...who }, board('job-c', 1))).not.toThrow();
    expect(readSavedBoard('job-c')).toBeNull();
    setItem.mockRestore();
  });

  it('remembers the view last open, and sign-out forgets every board', () => {
    saveBoard({ jobId: 'job-a', liveAt: 1_000, ...who }, board('job-a', 1));
    expect(savedBoardEntry('job-a')?.view).toBe('board');
    rememberSavedView('job-a', 'rigger');
    expect(latestSavedBoard()?.view).toBe('rigger');
    localStorage.setItem('holdline.theme', 'night');
    localStorage.setItem('holdline.savedBoard.orphan', '{}');
    clearSavedBoards();
    expect(Object.keys(localStorage).filter((k) => k.startsWith('holdline.savedBoard'))).toEqual([]);
    expect(latestSavedBoard()).toBeNull();
    // Only the saved boards go: the device's own settings stay.
    expect(localStorage.getItem('holdline.theme')).toBe('night');
  });
});

describe('how old a saved board is, in words', () => {
  const at = Date.UTC(2026, 11, 4, 14, 2, 0);
  it('is never said younger than it is: whole minutes rounded up', () => {
    expect(ageWords(at, at + 59_000)).toBe('less than a minute ago');
    expect(ageWords(at, at + 60_000)).toBe('1 min ago');
    expect(ageWords(at, at + 61_000)).toBe('2 min ago');
    expect(ageWords(at, at + 12.5 * 60_000)).toBe('13 min ago');
    expect(ageWords(at, at + 59 * 60_000 + 1_000)).toBe('1 h ago');
    expect(ageWords(at, at + 61 * 60_000 + 10_000)).toBe('1 h 2 min ago');
    expect(ageWords(at, at + 47 * 3_600_000)).toBe('47 h ago');
    expect(ageWords(at, at + 49 * 3_600_000)).toBe('more than 2 days ago');
    // A device clock behind the saved time reads as new, not as a negative age.
    expect(ageWords(at, at - 5_000)).toBe('less than a minute ago');
  });
});
