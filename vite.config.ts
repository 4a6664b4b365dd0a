import { fileURLToPath, URL } from 'node:url';
import { defineConfig } from 'vite';
import vue from '@vitejs/plugin-vue';
import { quasar, transformAssetUrls } from '@quasar/vite-plugin';
import { compression } from 'vite-plugin-compression2';

const serverPort = Number(process.env.PORT ?? 3000);

export default defineConfig({
  plugins: [
    vue({ template: { transformAssetUrls } }),
    quasar({ sassVariables: false }),
    // A Brotli (.br) and a gzip (.gz) copy beside every script, style sheet and SVG of the build, at
    // the strongest levels, so the server sends them as they are (server/app.ts) and compresses
    // nothing per request. Fonts are woff2, compressed already. A copy no smaller than its file is skipped.
    compression({ include: /\.(js|css|svg)$/, algorithms: ['brotliCompress', 'gzip'] }),
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
  build: { outDir: 'dist', emptyOutDir: true, chunkSizeWarningLimit: 900 },
});
