import { onBeforeUnmount, onMounted, ref } from 'vue';

/** The part of the Screen Wake Lock API used here (not in every TypeScript DOM library yet). */
interface WakeLockSentinelLike {
  released: boolean;
  release(): Promise<void>;
  addEventListener(type: 'release', listener: () => void): void;
}
interface WakeLockLike {
  request(type: 'screen'): Promise<WakeLockSentinelLike>;
}

// One lock for the tab, shared by every board view that asks (the layout, the cab's settings line).
const supported = typeof navigator !== 'undefined' && 'wakeLock' in navigator;
const active = ref(false);
/** Asked and refused (or not supported at all): the views say the screen may sleep. */
const failed = ref(!supported);
let sentinel: WakeLockSentinelLike | null = null;
let users = 0;
let asking = false;

async function request() {
  if (!supported || users === 0 || asking || document.visibilityState !== 'visible' || (sentinel && !sentinel.released)) return;
  asking = true;
  try {
    const got = await (navigator as unknown as { wakeLock: WakeLockLike }).wakeLock.request('screen');
    // Every view closed while the browser was answering: give it back.
    if (users === 0) {
      void got.release();
      return;
    }
    sentinel = got;
    active.value = true;
    failed.value = false;
    got.addEventListener('release', () => {
      if (sentinel === got) active.value = false;
    });
  } catch {
    // Refused: battery saver, a browser that wants a tap first, or a policy. Said on screen, tried again on the next tap.
    active.value = false;
    failed.value = true;
  } finally {
    asking = false;
  }
}

/** The lock is lost whenever the tab is hidden: asked for again when it comes back. */
function onVisibility() {
  if (document.visibilityState === 'visible') void request();
}

/** Some browsers grant the lock only after a touch: the first tap after a refusal asks again. */
function onTap() {
  if (!active.value) void request();
}

/**
 * Keeps the screen awake while a board view is open and visible, where the browser allows it, and
 * says whether it could (`failed`: show WAKE_LOCK_WORDS.failed).
 */
export function useWakeLock() {
  onMounted(() => {
    users += 1;
    if (users > 1) return;
    document.addEventListener('visibilitychange', onVisibility);
    document.addEventListener('pointerdown', onTap, { capture: true });
    void request();
  });
  onBeforeUnmount(() => {
    users -= 1;
    if (users > 0) return;
    document.removeEventListener('visibilitychange', onVisibility);
    document.removeEventListener('pointerdown', onTap, { capture: true });
    const held = sentinel;
    sentinel = null;
    active.value = false;
    void held?.release().catch(() => undefined);
  });
  return { supported, active, failed };
}
