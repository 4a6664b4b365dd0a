import { useQuasar } from 'quasar';
import { onBeforeUnmount, onMounted } from 'vue';
import { onBeforeRouteLeave, onBeforeRouteUpdate } from 'vue-router';

/** The question a form asks before its unsaved changes are dropped. */
export interface LeaveWords {
  title: string;
  message: string;
  stay: string;
  leave: string;
}

/**
 * Asks before a form with unsaved changes is left: another route, another tab of the same page (a
 * query change), the back button, or closing and reloading the browser tab (the browser's own
 * question). `isDirty` is read at the moment of leaving.
 */
export function useLeaveGuard(isDirty: () => boolean, words: LeaveWords, onLeave?: () => void) {
  const $q = useQuasar();

  function confirmLeave(): Promise<boolean> {
    return new Promise((resolve) => {
      $q.dialog({
        title: words.title,
        message: words.message,
        cancel: { label: words.stay, flat: true, noCaps: true, class: 'hl-touch' },
        ok: { label: words.leave, color: 'negative', unelevated: true, noCaps: true, class: 'hl-touch' },
        persistent: true,
      })
        .onOk(() => {
          onLeave?.();
          resolve(true);
        })
        .onCancel(() => resolve(false));
    });
  }

  onBeforeRouteUpdate((to, from) => (to.fullPath !== from.fullPath && isDirty() ? confirmLeave() : true));
  onBeforeRouteLeave(() => (isDirty() ? confirmLeave() : true));

  function warnBeforeUnload(event: BeforeUnloadEvent) {
    if (isDirty()) event.preventDefault();
  }
  onMounted(() => window.addEventListener('beforeunload', warnBeforeUnload));
  onBeforeUnmount(() => window.removeEventListener('beforeunload', warnBeforeUnload));
  return { confirmLeave };
}
