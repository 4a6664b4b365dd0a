import { reactive } from 'vue';
import { describeError } from '../services/api';

/**
 * Loading state and the last problem per resource key ("units", "job:<id>", ...) for a store.
 * Callers asking for the same key at the same time share one request.
 */
export function useLoadTracker() {
  const loadingKeys = reactive(new Set<string>());
  const problems = reactive<Record<string, string>>({});
  const inFlight = new Map<string, Promise<unknown>>();

  /** Runs one load under a key; a failure is kept as that key's problem and answers null. */
  function track<T>(key: string, work: () => Promise<T>): Promise<T | null> {
    const running = inFlight.get(key) as Promise<T | null> | undefined;
    if (running) return running;
    const promise = (async () => {
      loadingKeys.add(key);
      delete problems[key];
      try {
        return await work();
      } catch (error) {
        problems[key] = describeError(error);
        return null;
      } finally {
        loadingKeys.delete(key);
        inFlight.delete(key);
      }
    })();
    inFlight.set(key, promise);
    return promise;
  }

  return {
    loadingKeys,
    problems,
    track,
    isLoading: (key: string) => loadingKeys.has(key),
    problemOf: (key: string) => problems[key] ?? '',
  };
}
