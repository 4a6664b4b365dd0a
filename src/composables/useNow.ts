import { onBeforeUnmount, ref } from 'vue';

/** The current time, updated every `everyMs`, so ages ("4 min ago") stay true without events. */
export function useNow(everyMs = 1000) {
  const now = ref(Date.now());
  const timer = setInterval(() => (now.value = Date.now()), everyMs);
  onBeforeUnmount(() => clearInterval(timer));
  return now;
}
