import { defineConfig } from 'vite';
import vue from '@vitejs/plugin-vue';
import { quasar, transformAssetUrls } from '@quasar/vite-plugin';

/**
 * The empty Quasar page, built with the plugins and options of the root vite.config.ts so the
 * baseline pays for the same framework setup as the Holdline client. The output folder is given on
 * the command line (`vite build --config bench/empty-page/vite.config.ts --outDir <tmp>`).
 */
export default defineConfig({
  root: import.meta.dirname,
  // This folder is the root (its index.html is the entry); packages still come from the repository's node_modules.
  plugins: [vue({ template: { transformAssetUrls } }), quasar({ sassVariables: false })],
  logLevel: 'warn',
  build: { emptyOutDir: true, chunkSizeWarningLimit: 900 },
});
