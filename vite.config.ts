import { fileURLToPath, URL } from 'node:url';
import { defineConfig } from 'vite';
import vue from '@vitejs/plugin-vue';
import { quasar, transformAssetUrls } from '@quasar/vite-plugin';
import { compression } from 'vite-plugin-compression2';
import { VitePWA } from 'vite-plugin-pwa';

const serverPort = Number(process.env.PORT ?? 3000);

export default defineConfig({
  plugins: [
    vue({ template: { transformAssetUrls } }),
    quasar({ sassVariables: false }),
    // A Brotli (.br) and a gzip (.gz) copy beside every script, style sheet and SVG of the build, at
    // the strongest levels, so the server sends them as they are (server/app.ts) and compresses
    // nothing per request. Fonts are woff2, compressed already. A copy no smaller than its file is skipped.
    compression({ include: /\.(js|css|svg)$/, algorithms: ['brotliCompress', 'gzip'] }),
    // The installable web app: a service worker that keeps the app shell (index.html, every built
    // script and style sheet, the fonts and icons) so a phone that reloads with no network still opens
    // the last board it saw (src/services/saved-boards.ts). It caches no /api answer: the board's
    // truth is the server's. Registered by src/main.ts, not by an injected script.
    VitePWA({
      strategies: 'generateSW',
      registerType: 'autoUpdate',
      injectRegister: false,
      filename: 'sw.js',
      manifestFilename: 'manifest.webmanifest',
      // The icons and favicon are precached by the glob below; listed again they would be precached twice.
      includeManifestIcons: false,
      manifest: {
        name: 'Holdline',
        short_name: 'Holdline',
        description: 'One live board for a crane assembly crew',
        id: '/',
        start_url: '/',
        scope: '/',
        display: 'standalone',
        orientation: 'any',
        theme_color: '#1d2b3a',
        background_color: '#f4efe4',
        icons: [
          { src: '/icons/icon.svg', sizes: 'any', type: 'image/svg+xml', purpose: 'any' },
          { src: '/icons/icon-192.png', sizes: '192x192', type: 'image/png', purpose: 'any' },
          { src: '/icons/icon-512.png', sizes: '512x512', type: 'image/png', purpose: 'any' },
          { src: '/icons/icon-maskable-512.png', sizes: '512x512', type: 'image/png', purpose: 'maskable' },
        ],
      },
      workbox: {
        // woff2 only: every browser that runs a service worker reads it, so the .woff copies stay out.
        globPatterns: ['**/*.{js,css,html,svg,png,woff2}'],
        // The largest lazy chunk is under the build's 900 kB warning; leave room above it.
        maximumFileSizeToCacheInBytes: 3 * 1024 * 1024,
        navigateFallback: 'index.html',
        // The API and the live socket are never answered from the shell, nor from any cache.
        navigateFallbackDenylist: [/^\/api\//, /^\/socket\.io\//],
        runtimeCaching: [],
        cleanupOutdatedCaches: true,
        clientsClaim: true,
        skipWaiting: true,
      },
    }),
  ],
  resolve: { alias: { '@': fileURLToPath(new URL('./src', import.meta.url)) } },
  server: {
    port: 5173,
    proxy: {
      // The browser's Host is kept (no changeOrigin) so the server sees the page's Origin naming
      // the address the request came to and lets it through (server/middlewares/security.ts).
      '/api': { target: `http://localhost:${serverPort}`, changeOrigin: false },
      '/socket.io': { target: `http://localhost:${serverPort}`, ws: true },
    },
  },
  build: {
    outDir: 'dist',
    emptyOutDir: true,
    chunkSizeWarningLimit: 900,
    // Writing the service worker's precache list (closeBundle) takes a few seconds after the bundle:
    // expected, and not worth a timing warning on every build.
    rolldownOptions: { checks: { bundlerTimings: false } },
  },
});
