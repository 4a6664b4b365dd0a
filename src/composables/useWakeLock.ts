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

/**
 * Keeps the screen awake while the view is open, where the browser supports it. The lock is lost
 * whenever the tab is hidden, so it is asked for again when the tab comes back.
 */
export function useWakeLock() {
  const supported = typeof navigator !== 'undefined' && 'wakeLock' in navigator;
  const active = ref(false);
  const problem = ref('');
  let sentinel: WakeLockSentinelLike | null = null;

  async function request() {
    if (!supported || document.visibilityState !== 'visible') return;
    try {
      sentinel = await (navigator as unknown as { wakeLock: WakeLockLike }).wakeLock.request('screen');
      active.value = true;
      problem.value = '';
      sentinel.addEventListener('release', () => {
        active.value = false;
      });
    } catch (error) {
      active.value = false;
      problem.value = error instanceof Error ? error.message : 'The screen could not be kept awake.';
    }
  }

  function onVisibility() {
    if (document.visibilityState === 'visible' && (!sentinel || sentinel.released)) void request();
  }

  onMounted(() => {
    void request();
    document.addEventListener('visibilitychange', onVisibility);
  });
  onBeforeUnmount(() => {
    document.removeEventListener('visibilitychange', onVisibility);
    void sentinel?.release();
    sentinel = null;
  });
  return { supported, active, problem };
}
