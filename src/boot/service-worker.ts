/**
 * Registers the service worker that vite-plugin-pwa builds (vite.config.ts) a few seconds after the
 * page has loaded, when the browser is idle: installing it downloads the whole app shell (about half
 * a megabyte compressed), which on a slow site network would otherwise compete with the first
 * board's own parts and data (measured: `npx tsx bench/run.ts --only client`). The sign-in page's
 * first load carries only these few lines. In development (Vite's server) there is none.
 */
export function registerServiceWorker(): void {
  if (!import.meta.env.PROD || !('serviceWorker' in navigator)) return;
  const register = () => void navigator.serviceWorker.register('/sw.js', { scope: '/' }).catch(() => undefined);
  const later = () =>
    setTimeout(() => {
      if (typeof window.requestIdleCallback === 'function') window.requestIdleCallback(register, { timeout: IDLE_WAIT_MS });
      else register();
    }, REGISTER_AFTER_MS);
  if (document.readyState === 'complete') later();
  else window.addEventListener('load', later, { once: true });

  // A new version took over while this page ran the old one: the old lazily loaded parts are gone
  // from the server and from the cache. Load the new version once, rather than a screen that fails.
  window.addEventListener('vite:preloadError', (event) => {
    const last = Number(sessionStorage.getItem(RELOADED_KEY) ?? 0);
    if (Date.now() - last < RELOAD_GAP_MS) return;
    sessionStorage.setItem(RELOADED_KEY, String(Date.now()));
    event.preventDefault();
    window.location.reload();
  });
}

/** After the page's load event: the first screen's lazy parts and first data go first. */
const REGISTER_AFTER_MS = 5000;
const IDLE_WAIT_MS = 5000;
const RELOADED_KEY = 'holdline.reloadedForUpdate';
/** At most one reload this often: a part missing for another reason must not reload the page in a loop. */
const RELOAD_GAP_MS = 30_000;
