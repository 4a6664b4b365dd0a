import type { BoardSnapshot } from '../../shared/board/types';

/**
 * The last board each job showed on this device, so a phone that reloads with no network (the app
 * shell comes from the service worker) still opens it, marked not live with its age. One small
 * index (read by the router before anything else loads) and one board per job. What is kept is
 * exactly what the server sent this person (already redacted for them), with who they were; never
 * a token. Sign-out, and a session the server refuses, clear it all (stores/session.ts).
 */
export interface SavedBoardEntry {
  jobId: string;
  /** The board view last open on this job (cab, rigger…), where an app launched offline goes. */
  view: string;
  seq: number;
  /** When the board was last known live (its last tick or event), ms since the epoch. */
  liveAt: number;
  /** Who saw it: the stored board is theirs and nobody else's. */
  userId: string;
  userName: string;
}

export interface SavedBoard extends SavedBoardEntry {
  board: BoardSnapshot;
}

const INDEX_KEY = 'holdline.savedBoards';
const BOARD_PREFIX = 'holdline.savedBoard.';
/** Boards kept at most: a phone follows one or two jobs; storage is a few megabytes per site. */
export const SAVED_BOARDS_KEPT = 4;

function readIndex(): SavedBoardEntry[] {
  try {
    const parsed: unknown = JSON.parse(localStorage.getItem(INDEX_KEY) ?? '[]');
    return Array.isArray(parsed) ? parsed.filter(isEntry) : [];
  } catch {
    return [];
  }
}

function isEntry(value: unknown): value is SavedBoardEntry {
  const e = value as Partial<SavedBoardEntry> | null;
  return (
    !!e &&
    typeof e.jobId === 'string' &&
    typeof e.view === 'string' &&
    typeof e.seq === 'number' &&
    typeof e.liveAt === 'number' &&
    typeof e.userId === 'string' &&
    typeof e.userName === 'string'
  );
}

function writeIndex(entries: SavedBoardEntry[]): void {
  localStorage.setItem(INDEX_KEY, JSON.stringify(entries));
}

/** The entry of one job's saved board, if this device keeps one. */
export function savedBoardEntry(jobId: string): SavedBoardEntry | null {
  return readIndex().find((e) => e.jobId === jobId) ?? null;
}

/** The board saved most recently live, for an app opened offline at its start page. */
export function latestSavedBoard(): SavedBoardEntry | null {
  return readIndex().reduce<SavedBoardEntry | null>((best, e) => (!best || e.liveAt > best.liveAt ? e : best), null);
}

/** One job's saved board with its entry; null when there is none or it cannot be read. */
export function readSavedBoard(jobId: string): SavedBoard | null {
  const entry = savedBoardEntry(jobId);
  if (!entry) return null;
  try {
    const board = JSON.parse(localStorage.getItem(BOARD_PREFIX + jobId) ?? 'null') as BoardSnapshot | null;
    if (!board || board.job?.id !== jobId || board.seq !== entry.seq) return null;
    return { ...entry, board };
  } catch {
    return null;
  }
}

/**
 * Keeps `board` as this job's last board, newest first (the oldest beyond SAVED_BOARDS_KEPT
 * dropped). The board's text is written only when its seq or its reader changed; otherwise only the
 * small index moves (the time it was last live). The index is written after the board, and a
 * board read back must match its entry's seq, so a write cut half-way is never shown. A full
 * storage drops the other jobs' boards and tries once more; saving never throws.
 */
export function saveBoard(entry: Omit<SavedBoardEntry, 'view' | 'seq'> & { view?: string }, board: BoardSnapshot): void {
  try {
    const all = readIndex();
    const before = all.find((e) => e.jobId === entry.jobId);
    const others = all.filter((e) => e.jobId !== entry.jobId);
    const kept: SavedBoardEntry[] = [{ ...entry, seq: board.seq, view: entry.view ?? before?.view ?? 'board' }, ...others.slice(0, SAVED_BOARDS_KEPT - 1)];
    for (const dropped of others.slice(SAVED_BOARDS_KEPT - 1)) localStorage.removeItem(BOARD_PREFIX + dropped.jobId);
    if (before?.seq !== board.seq || before.userId !== entry.userId) {
      const text = JSON.stringify(board);
      try {
        localStorage.setItem(BOARD_PREFIX + entry.jobId, text);
      } catch {
        for (const other of others) localStorage.removeItem(BOARD_PREFIX + other.jobId);
        kept.splice(1);
        localStorage.setItem(BOARD_PREFIX + entry.jobId, text);
      }
    }
    writeIndex(kept);
  } catch {
    // Storage refused (full, private mode): the device keeps nothing, the live board goes on.
  }
}

/** Remembers which view of a saved board was last open (an app launched offline opens it). */
export function rememberSavedView(jobId: string, view: string): void {
  try {
    const entries = readIndex();
    const entry = entries.find((e) => e.jobId === jobId);
    if (!entry || entry.view === view) return;
    entry.view = view;
    writeIndex(entries);
  } catch {
    // Nothing kept: an app opened offline lands on the whole board instead.
  }
}

/** Forgets every saved board (sign-out, a session refused). */
export function clearSavedBoards(): void {
  try {
    for (const e of readIndex()) localStorage.removeItem(BOARD_PREFIX + e.jobId);
    // Boards whose index entry was lost too.
    for (let i = localStorage.length - 1; i >= 0; i--) {
      const key = localStorage.key(i);
      if (key?.startsWith(BOARD_PREFIX)) localStorage.removeItem(key);
    }
    localStorage.removeItem(INDEX_KEY);
  } catch {
    // Nothing to clear where storage cannot be read.
  }
}
