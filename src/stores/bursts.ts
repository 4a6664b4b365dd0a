/** How long a burst of events for one job is gathered before the one refetch it needs. */
export const BURST_MS = 300;

/**
 * Runs the work for a key at most once per burst: the first call waits `waitMs`, calls for the
 * same key in that time join it. A board event often comes with others (a release settles several
 * stages, a revision follows a defect), and one job needs reading back once, not once per event.
 */
export function createBurstRunner(waitMs: number = BURST_MS) {
  const waiting = new Map<string, ReturnType<typeof setTimeout>>();
  return {
    run(key: string, work: () => unknown): void {
      if (waiting.has(key)) return;
      waiting.set(
        key,
        setTimeout(() => {
          waiting.delete(key);
          void work();
        }, waitMs),
      );
    },
  };
}
