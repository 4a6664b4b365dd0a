import { onBeforeUnmount, ref } from 'vue';

/** How long the stop control must be held: longer than any bump or pocket press. */
export const HOLD_TO_CONFIRM_MS = 1500;

/**
 * A press that only counts when held for `durationMs` without letting go: progress runs from 0 to
 * 1 while held, drops back when released early, and `onConfirm` runs once when it reaches 1.
 * Pointer and keyboard share it, so the same deliberate gesture works without a mouse.
 */
export function useHoldToConfirm(
  onConfirm: () => void,
  durationMs: number = HOLD_TO_CONFIRM_MS,
  now: () => number = () => Date.now(),
  enabled: () => boolean = () => true,
) {
  const progress = ref(0);
  const holding = ref(false);
  let startedAt = 0;
  let timer: ReturnType<typeof setInterval> | undefined;
  let resetTimer: ReturnType<typeof setTimeout> | undefined;

  function stopTimer() {
    clearInterval(timer);
    timer = undefined;
  }

  function tick() {
    progress.value = Math.min(1, (now() - startedAt) / durationMs);
    if (progress.value >= 1) {
      stopTimer();
      holding.value = false;
      onConfirm();
      // The full ring shows for a moment that it counted, then empties for the next press.
      resetTimer = setTimeout(() => (progress.value = 0), 800);
    }
  }

  /** Starts the hold; a second start while holding (key repeat) changes nothing. */
  function start() {
    if (holding.value) return;
    clearTimeout(resetTimer);
    holding.value = true;
    startedAt = now();
    progress.value = 0;
    // A short interval rather than requestAnimationFrame: it keeps running in a background tab and under fake timers.
    timer = setInterval(tick, 30);
  }

  /** Lets go: before the end nothing happens and the ring empties. */
  function cancel() {
    if (!holding.value) return;
    stopTimer();
    holding.value = false;
    progress.value = 0;
  }

  /** Pointer down: the pointer stays captured, so a finger sliding a little does not cancel the hold. */
  function onPointerDown(event: PointerEvent) {
    if (!enabled()) return;
    (event.currentTarget as HTMLElement | null)?.setPointerCapture?.(event.pointerId);
    start();
  }
  /** Space or Enter held down is the same gesture as a finger held on the control. */
  function onKeyDown(event: KeyboardEvent) {
    if (event.key !== ' ' && event.key !== 'Enter') return;
    event.preventDefault();
    if (!event.repeat && enabled()) start();
  }
  function onKeyUp(event: KeyboardEvent) {
    if (event.key === ' ' || event.key === 'Enter') cancel();
  }

  onBeforeUnmount(() => {
    stopTimer();
    clearTimeout(resetTimer);
  });
  return { progress, holding, start, cancel, onPointerDown, onKeyDown, onKeyUp };
}
