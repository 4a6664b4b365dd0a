/**
 * Registers the service worker that vite-plugin-pwa builds (vite.config.ts) once the page has
 * loaded, so it never competes with the first paint; the sign-in page's first load carries only
 * these few lines. In development (Vite's server) there is none.
 */
export function registerServiceWorker(): void {
  if (!import.meta.env.PROD || !('serviceWorker' in navigator)) return;
  const register = () => void navigator.serviceWorker.register('/sw.js', { scope: '/' }).catch(() => undefined);
  if (document.readyState === 'complete') register();
  else window.addEventListener('load', register, { once: true });

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

const RELOADED_KEY = 'holdline.reloadedForUpdate';
/** At most one reload this often: a part missing for another reason must not reload the page in a loop. */
const RELOAD_GAP_MS = 30_000;
