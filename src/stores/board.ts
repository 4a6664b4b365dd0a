import { defineStore } from 'pinia';
import { computed, ref, shallowRef } from 'vue';
import { BoardFollower } from '../../shared/board/follower';
import type { BoardSnapshot, BoardState } from '../../shared/board/types';
import type { CommandAnswer } from '../../shared/events/socket';
import { actingSupervisorCommands, commandsBeforeBriefing, commandsWhileMadeSafe, commandsWhileMakingSafe, commandsWhileStopped, type BoardCommand } from '../../shared/schemas/commands';
import { isActingSupervisor, isBriefed, shiftOf } from '../../shared/board/shifts';
import type { CrewRole } from '../../shared/schemas/jobs';
import type { JobEventDto } from '../../shared/events/log';
import { fetchEventsAfter } from '../services/events';
import { readSavedBoard, rememberSavedView, saveBoard, type SavedBoardEntry } from '../services/saved-boards';
import { connectSocket, type HoldlineSocket } from '../services/socket';
import { BLOCKED_WORDS } from '../words/board';
import { SAVED_BOARD_WORDS } from '../words/offline';
import { useSessionStore } from './session';

type DistributiveOmit<T, K extends PropertyKey> = T extends unknown ? Omit<T, K> : never;
/** A command as a view sends it; the store adds the id. */
export type CommandInput = DistributiveOmit<BoardCommand, 'commandId'>;

/** A reader of the open board's events: the event and the board right after it. */
export type BoardEventListener = (event: JobEventDto, board: BoardState) => void;

/** A stop pressed while the board was not live: kept until the server has it. */
export interface QueuedStop {
  commandId: string;
  pressedAt: string;
  reason?: string;
}

const QUEUED_STOP_KEY = 'holdline.queuedStop';
const COMMAND_TIMEOUT_MS = 8000;

/** Plain words for a command that failed without an answer. */
const NO_ANSWER = 'No answer from the server. Check the connection; the command was not confirmed.';
/**
 * Refusals that mean "not recorded, for now": the server is restarting or could not write
 * (server/db/faults.ts). A stop refused so is kept and sent again with the same id, never dropped.
 */
const NOT_RECORDED_FOR_NOW = new Set(['no_answer', 'server_restarting', 'storage_full', 'storage_busy', 'storage_readonly', 'storage_failed', 'too_many_commands']);
/** A kept stop is sent again at least this often while the board is live (a storage fault does not drop the connection). */
const STOP_RETRY_MS = 5000;
/** A live board is saved on the device when its seq moves, and at least this often (the time it was last live). */
const SAVE_EVERY_MS = 15_000;
/** A burst of events writes the board once: at most this often (the last one a moment later). */
const SAVE_GAP_MS = 2000;
/** Signed in and online, a board that has not joined after this long shows the saved one meanwhile. */
const SAVED_AFTER_MS = 4000;
/** While a saved board shows without a session, the session is tried again this often (and at once when the browser says it is online). */
const OFFLINE_RETRY_MS = 5000;

/**
 * The live board of one job for every view: joins through the socket, applies server events with
 * the shared reducer strictly in seq order (via BoardFollower), watches the ticks, and sends
 * commands without changing anything until the server answers.
 */
export const useBoardStore = defineStore('board', () => {
  const session = useSessionStore();
  const jobId = ref<string | null>(null);
  const board = shallowRef<BoardSnapshot | null>(null);
  const live = ref(false);
  /** When the server said it is restarting (`server:restarting`, or a `server_restarting` refusal); null once the board is live again. */
  const restartingSince = ref<number | null>(null);
  const lastSyncAt = ref(0);
  const loading = ref(false);
  const error = ref('');
  /** Ids of commands sent and not yet answered, so buttons can show they are waiting. */
  const waiting = ref(new Set<string>());
  const queuedStop = ref<QueuedStop | null>(null);
  /** The last event applied, for flashes, sounds and announcements. */
  const lastEvent = shallowRef<JobEventDto | null>(null);
  /**
   * The board shown is the one this device saved (services/saved-boards.ts), not the server's: the
   * server cannot be reached. Null once a live board arrives. Nothing is sent from it but the stop,
   * which queues as it does whenever the board is not live.
   */
  const saved = shallowRef<SavedBoardEntry | null>(null);
  /** Who is looking: the signed-in person, or whoever saved the board shown offline. */
  const viewerId = computed(() => session.user?.id ?? saved.value?.userId ?? null);

  /** The stores that follow the open job's events (jobs, plan): one socket, one follower, several readers. */
  const listeners = new Set<BoardEventListener>();
  /** Calls `listener` with every event the open board applies, in seq order; answers a function that stops it. */
  function onBoardEvent(listener: BoardEventListener): () => void {
    listeners.add(listener);
    return () => listeners.delete(listener);
  }

  let socket: HoldlineSocket | null = null;
  let follower: BoardFollower | null = null;
  let livenessTimer: ReturnType<typeof setInterval> | undefined;
  const detach: (() => void)[] = [];
  /** A kept stop is being sent now; when it was last tried. */
  let sendingStop = false;
  let lastStopTryAt = 0;
  let lastSavedAt = 0;
  let lastSavedSeq = -1;
  let saveLater: ReturnType<typeof setTimeout> | undefined;
  let savedTimer: ReturnType<typeof setTimeout> | undefined;
  /** The board view open now (cab, rigger…), kept with the saved board: an app opened offline goes back to it. */
  let viewName: string | undefined;
  let offlineTimer: ReturnType<typeof setInterval> | undefined;

  const myRoles = computed<CrewRole[]>(() => (board.value?.crew ?? []).filter((c) => c.userId === viewerId.value).map((c) => c.role));
  /** Briefed for the plan version in force and the shift (while made safe: the next shift), by the shared rule. */
  const briefed = computed(() => !!board.value && !!viewerId.value && isBriefed(board.value, viewerId.value));
  const stopped = computed(() => board.value?.job.state === 'stopped');
  /** The site's IANA time zone every time on the board is shown in (a board from before zones: the server's). */
  const siteTimeZone = computed(() => board.value?.job.timeZone ?? session.serverTimeZone);
  /** This person is the job's acting supervisor: the one who releases holds, ends and starts shifts. */
  const isActing = computed(() => !!board.value && !!viewerId.value && myRoles.value.includes('supervisor') && isActingSupervisor(board.value, viewerId.value));

  /**
   * Why a command cannot be sent now, in words to show beside its control, or '' when it can: the
   * board is not live; the job is stopped, ending its shift or made safe and the server accepts
   * only that state's commands (shared/schemas/commands.ts); or a crew member has not acknowledged
   * the briefing for this plan version and shift.
   */
  function blockReason(type: BoardCommand['type']): string {
    if (saved.value) return SAVED_BOARD_WORDS.blocked;
    if (!live.value) return restartingSince.value !== null ? BLOCKED_WORDS.restarting : BLOCKED_WORDS.notLive;
    const b = board.value;
    if (stopped.value && !commandsWhileStopped.has(type)) return BLOCKED_WORDS.stopped;
    if (b?.job.state === 'made_safe' && !commandsWhileMadeSafe.has(type)) return BLOCKED_WORDS.madeSafe;
    if (b && shiftOf(b).phase === 'making_safe' && !commandsWhileMakingSafe.has(type)) return BLOCKED_WORDS.makingSafe;
    if (b && myRoles.value.some((r) => r !== 'viewer') && !briefed.value && !commandsBeforeBriefing.has(type)) return BLOCKED_WORDS.notBriefed;
    if (b?.actingSupervisor && actingSupervisorCommands.has(type) && !isActing.value) return BLOCKED_WORDS.notActing(b.actingSupervisor.name);
    return '';
  }

  function refresh() {
    if (!follower) return;
    if (follower.board) {
      board.value = { ...follower.board };
      if (saved.value) stopShowingSaved();
    } else board.value = readSavedBoardOf(saved.value);
    const wasLive = live.value;
    live.value = follower.live;
    lastSyncAt.value = follower.lastSyncAt;
    if (live.value) restartingSince.value = null;
    if (live.value && (!wasLive || Date.now() - lastStopTryAt >= STOP_RETRY_MS)) void sendQueuedStop();
    if (live.value) keepOnDevice(false);
    else if (wasLive) keepOnDevice(true);
  }

  /**
   * Saves the live board on this device for a reload without network: when its seq moved, every
   * SAVE_EVERY_MS while live (the time it was last live), and once more when it stops being live.
   * Presence is left out: who was connected then says nothing about who is now.
   */
  function keepOnDevice(now: boolean) {
    const b = follower?.board;
    const user = session.user;
    if (!b || !user || !jobId.value || follower!.lastSyncAt <= 0) return;
    const since = Date.now() - lastSavedAt;
    if (!now && b.seq === lastSavedSeq && since < SAVE_EVERY_MS) return;
    clearTimeout(saveLater);
    if (!now && since < SAVE_GAP_MS) {
      saveLater = setTimeout(() => keepOnDevice(true), SAVE_GAP_MS - since);
      return;
    }
    lastSavedAt = Date.now();
    lastSavedSeq = b.seq;
    saveBoard({ jobId: jobId.value, view: viewName, liveAt: follower!.lastSyncAt, userId: user.id, userName: user.displayName }, { ...b, presence: [] });
  }

  /** The board this device saved for the open job, when it belongs to whoever is looking. */
  function readSavedBoardOf(entry: SavedBoardEntry | null): BoardSnapshot | null {
    if (!entry || !jobId.value) return null;
    return board.value && saved.value === entry ? board.value : (readSavedBoard(jobId.value)?.board ?? null);
  }

  /** No live board yet and the server out of reach: show the saved one, marked not live, and keep trying. */
  function showSaved() {
    clearTimeout(savedTimer);
    if (!jobId.value || follower?.board || saved.value) return;
    const kept = readSavedBoard(jobId.value);
    if (!kept || (session.user && session.user.id !== kept.userId)) return;
    const { board: keptBoard, ...entry } = kept;
    saved.value = entry;
    board.value = keptBoard;
    loading.value = false;
    if (!session.signedIn) {
      clearInterval(offlineTimer);
      offlineTimer = setInterval(() => void reconnectOffline(), OFFLINE_RETRY_MS);
      window.addEventListener('online', onOnline);
    }
  }

  /** The layout says which view is open, for the saved board. */
  function setView(name: string) {
    viewName = name;
    if (jobId.value) rememberSavedView(jobId.value, name);
  }

  function stopShowingSaved() {
    saved.value = null;
    clearTimeout(savedTimer);
    clearInterval(offlineTimer);
    window.removeEventListener('online', onOnline);
  }

  function onOnline() {
    void reconnectOffline();
  }

  /**
   * Opened offline, the socket has no token: once the server answers, the refresh cookie gives a
   * session and the socket connects with it (a refused cookie goes to the sign-in page, stores/session.ts).
   */
  async function reconnectOffline() {
    if (session.signedIn) {
      clearInterval(offlineTimer);
      if (socket && !socket.connected && !socket.active) socket.connect();
      return;
    }
    if (await session.refresh()) {
      clearInterval(offlineTimer);
      if (socket && !socket.connected && !socket.active) socket.connect();
    }
  }

  /** The server is going down to restart: not live at once (it takes no command now), and the cover says why. */
  function serverRestarting() {
    restartingSince.value ??= Date.now();
    follower?.onDisconnect();
  }

  /** Opens a job's board; opening another closes the first. */
  async function open(id: string) {
    if (jobId.value === id && follower) return;
    close();
    jobId.value = id;
    queuedStop.value = readQueuedStop(id);
    loading.value = true;
    error.value = '';
    socket = connectSocket(() => session.token);
    const s = socket;
    follower = new BoardFollower(
      id,
      {
        join: (job, afterSeq) => s.timeout(COMMAND_TIMEOUT_MS).emitWithAck('board:join', afterSeq === undefined ? { jobId: job } : { jobId: job, afterSeq }),
        fetchEvents: fetchEventsAfter,
      },
      {
        onChange: refresh,
        onEvent: (event, applied) => {
          lastEvent.value = event;
          for (const listener of listeners) listener(event, applied);
        },
      },
    );
    const f = follower;
    const onEvent = (e: JobEventDto) => f.onEvent(e);
    const onTick = (t: { jobId: string; seq: number }) => f.onTick(t);
    const onPresence = (p: Parameters<BoardFollower['onPresence']>[0]) => f.onPresence(p);
    const onConnect = () => void join();
    const onDisconnect = () => f.onDisconnect();
    // The server cannot be reached: the saved board meanwhile, if this device has one.
    const onConnectError = () => showSaved();
    const onRestarting = () => serverRestarting();
    s.on('server:restarting', onRestarting);
    // Taken off the crew while watching: the server stops sending this board and says why; the
    // board closes with that sentence instead of going quiet as if the connection were lost.
    const onRemoved = (p: { jobId: string; reason: string }) => {
      if (p.jobId !== id) return;
      close();
      error.value = p.reason;
    };
    s.on('board:removed', onRemoved);
    s.on('disconnect', onDisconnect);
    s.on('board:event', onEvent);
    s.on('board:tick', onTick);
    s.on('board:presence', onPresence);
    s.on('connect', onConnect);
    s.on('connect_error', onConnectError);
    detach.push(() => {
      s.off('connect_error', onConnectError);
      s.off('board:event', onEvent);
      s.off('board:tick', onTick);
      s.off('board:presence', onPresence);
      s.off('connect', onConnect);
      s.off('disconnect', onDisconnect);
      s.off('server:restarting', onRestarting);
      s.off('board:removed', onRemoved);
    });
    livenessTimer = setInterval(() => f.checkLiveness(), 250);
    savedTimer = setTimeout(showSaved, session.signedIn && navigator.onLine !== false ? SAVED_AFTER_MS : 0);
    if (s.connected) await join();
    else loading.value = true;
  }

  async function join() {
    if (!follower) return;
    try {
      await follower.join();
      error.value = '';
    } catch (e) {
      error.value = e instanceof Error ? e.message : 'Could not open the board.';
    } finally {
      loading.value = false;
      refresh();
    }
  }

  function close() {
    clearInterval(livenessTimer);
    // The last word on how live it was, before the board goes.
    if (live.value) keepOnDevice(true);
    clearTimeout(saveLater);
    stopShowingSaved();
    lastSavedSeq = -1;
    for (const off of detach.splice(0)) off();
    if (socket && jobId.value) socket.emit('board:leave', { jobId: jobId.value });
    follower = null;
    board.value = null;
    live.value = false;
    restartingSince.value = null;
    jobId.value = null;
  }

  /**
   * Sends a command and waits for the server. Nothing on the board changes until the server's event
   * arrives; the answer's refusal is returned in plain words.
   */
  async function send(command: CommandInput, commandId: string = crypto.randomUUID()): Promise<CommandAnswer> {
    if (!socket || !jobId.value) return { ok: false, error: { code: 'not_open', message: 'The board is not open.' } };
    waiting.value = new Set(waiting.value).add(commandId);
    try {
      const answer = await socket.timeout(COMMAND_TIMEOUT_MS).emitWithAck('board:command', { jobId: jobId.value, command: { ...command, commandId } as BoardCommand });
      if (answer.ok) follower?.onEvent(answer.event);
      // The refusal may overtake the notice: either one tells this board the server is going down.
      else if (answer.error.code === 'server_restarting') serverRestarting();
      return answer;
    } catch {
      return { ok: false, error: { code: 'no_answer', message: NO_ANSWER } };
    } finally {
      const next = new Set(waiting.value);
      next.delete(commandId);
      waiting.value = next;
    }
  }

  /**
   * The stop control. Works while not live: the stop is kept with the time it was pressed and sent
   * the moment the board is live again (same command id, so it is never recorded twice).
   */
  async function stop(reason?: string): Promise<CommandAnswer | null> {
    const pending: QueuedStop = { commandId: crypto.randomUUID(), pressedAt: new Date().toISOString(), ...(reason ? { reason } : {}) };
    if (!live.value) {
      keepStop(pending);
      return null;
    }
    const answer = await send({ type: 'job.stop', pressedAt: pending.pressedAt, ...(reason ? { reason } : {}) }, pending.commandId);
    // Refused because the server is restarting or cannot write: kept and sent again, as when offline.
    if (!answer.ok && answer.error.code !== 'no_answer' && NOT_RECORDED_FOR_NOW.has(answer.error.code)) {
      keepStop(pending);
      lastStopTryAt = Date.now();
      return null;
    }
    return answer;
  }

  function keepStop(pending: QueuedStop) {
    queuedStop.value = pending;
    localStorage.setItem(QUEUED_STOP_KEY, JSON.stringify({ ...pending, jobId: jobId.value }));
  }

  /** A reason picked while the stop is still queued travels with it. */
  function setQueuedStopReason(reason: string) {
    if (!queuedStop.value) return;
    queuedStop.value = { ...queuedStop.value, reason };
    localStorage.setItem(QUEUED_STOP_KEY, JSON.stringify({ ...queuedStop.value, jobId: jobId.value }));
  }

  async function sendQueuedStop() {
    const pending = queuedStop.value;
    if (!pending || !live.value || sendingStop) return;
    sendingStop = true;
    lastStopTryAt = Date.now();
    try {
      const answer = await send({ type: 'job.stop', pressedAt: pending.pressedAt, ...(pending.reason ? { reason: pending.reason } : {}) }, pending.commandId);
      // Kept while the server answers "not recorded, for now"; any other answer settles it.
      if ((answer.ok || !NOT_RECORDED_FOR_NOW.has(answer.error.code)) && queuedStop.value?.commandId === pending.commandId) {
        queuedStop.value = null;
        localStorage.removeItem(QUEUED_STOP_KEY);
      }
    } finally {
      sendingStop = false;
    }
  }

  function isWaiting(commandId: string) {
    return waiting.value.has(commandId);
  }

  return { jobId, board, live, saved, viewerId, setView, restartingSince, lastSyncAt, loading, error, waiting, queuedStop, lastEvent, myRoles, briefed, stopped, siteTimeZone, isActing, blockReason, onBoardEvent, open, close, send, stop, setQueuedStopReason, isWaiting };
});

/** A stop queued on this device for this job (it survives a reload while offline). */
function readQueuedStop(jobId: string): QueuedStop | null {
  try {
    const raw = localStorage.getItem(QUEUED_STOP_KEY);
    const stored = raw ? (JSON.parse(raw) as QueuedStop & { jobId: string }) : null;
    return stored && stored.jobId === jobId ? { commandId: stored.commandId, pressedAt: stored.pressedAt, ...(stored.reason ? { reason: stored.reason } : {}) } : null;
  } catch {
    return null;
  }
}
