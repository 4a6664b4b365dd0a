import { onBeforeUnmount, onMounted, ref, watch } from 'vue';
import type { BoardState } from '../../shared/board/types';
import { describeChange } from '../words/board';
import { useBoardStore } from '../stores/board';

/** Speech is per device and off until the operator turns it on; it is never kept across reloads. */
export const speechEnabled = ref(false);
/** Sound and vibration can be muted on a device (e.g. the supervisor's tablet in an office). */
export const soundEnabled = ref(true);

const FLASH_MS = 1600;

/** Whether this browser can speak at all. */
export function speechSupported(): boolean {
  return typeof window !== 'undefined' && 'speechSynthesis' in window && typeof SpeechSynthesisUtterance !== 'undefined';
}

let audio: AudioContext | null = null;

/** Browsers only let sound start after a tap or key press, so the context is made on the first one. */
function unlockAudio() {
  if (typeof AudioContext === 'undefined') return;
  audio ??= new AudioContext();
  if (audio.state === 'suspended') void audio.resume();
}

/**
 * A short tone made with the Web Audio API: two rising beeps for a change, three low ones for a stop.
 * No audio files are shipped.
 */
function tone(stop: boolean) {
  if (!audio || audio.state !== 'running') return;
  const beeps = stop ? [0, 0.32, 0.64] : [0, 0.22];
  for (const [i, offset] of beeps.entries()) {
    const osc = audio.createOscillator();
    const gain = audio.createGain();
    osc.type = 'square';
    osc.frequency.value = stop ? 440 : 660 + i * 220;
    const at = audio.currentTime + offset;
    gain.gain.setValueAtTime(0.0001, at);
    gain.gain.exponentialRampToValueAtTime(0.25, at + 0.02);
    gain.gain.exponentialRampToValueAtTime(0.0001, at + 0.2);
    osc.connect(gain).connect(audio.destination);
    osc.start(at);
    osc.stop(at + 0.22);
  }
}

function speak(sentence: string) {
  if (!speechSupported()) return;
  window.speechSynthesis.cancel();
  const utterance = new SpeechSynthesisUtterance(sentence);
  utterance.rate = 0.95;
  window.speechSynthesis.speak(utterance);
}

/**
 * Watches the board and, when a job, stage or hold state changes, says so everywhere at once: the
 * live region's text, a screen flash, a vibration, a tone, and speech when turned on. People in ear
 * defenders still see the flash and feel the vibration. The first board after opening is not a change.
 */
export function useStateAlerts() {
  const board = useBoardStore();
  const announcement = ref('');
  const urgent = ref(false);
  const flashing = ref(false);
  let flashTimer: ReturnType<typeof setTimeout> | undefined;
  let previous: BoardState | null = null;

  watch(
    () => board.board,
    (next) => {
      const before = previous;
      previous = next;
      const sentence = describeChange(before, next);
      if (!sentence || !next) return;
      const stop = next.job.state === 'stopped' && before?.job.state !== 'stopped';
      urgent.value = stop;
      announcement.value = sentence;
      flashing.value = true;
      clearTimeout(flashTimer);
      flashTimer = setTimeout(() => (flashing.value = false), FLASH_MS);
      if (soundEnabled.value) {
        tone(stop);
        if (typeof navigator !== 'undefined' && 'vibrate' in navigator) navigator.vibrate(stop ? [400, 150, 400, 150, 400] : [200, 100, 200]);
      }
      if (speechEnabled.value) speak(sentence);
    },
  );

  onMounted(() => {
    window.addEventListener('pointerdown', unlockAudio);
    window.addEventListener('keydown', unlockAudio);
  });
  onBeforeUnmount(() => {
    clearTimeout(flashTimer);
    window.removeEventListener('pointerdown', unlockAudio);
    window.removeEventListener('keydown', unlockAudio);
  });
  return { announcement, urgent, flashing };
}
