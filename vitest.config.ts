import { defineConfig } from 'vitest/config';
import vue from '@vitejs/plugin-vue';

// One Vitest run, four projects mirroring the source tree. The browser tests run one file at a
// time because each launches its own Chromium and server on a two-core machine.
export default defineConfig({
  test: {
    projects: [
      {
        test: {
          name: 'shared',
          include: ['tests/shared/**/*.test.ts'],
          environment: 'node',
        },
      },
      {
        test: {
          name: 'server',
          include: ['tests/server/**/*.test.ts'],
          environment: 'node',
          setupFiles: ['tests/setup-server.ts'],
          testTimeout: 20_000,
          hookTimeout: 30_000,
        },
      },
      {
        plugins: [vue()],
        test: {
          name: 'client',
          include: ['tests/client/**/*.test.ts'],
          environment: 'happy-dom',
        },
      },
      {
        test: {
          name: 'e2e',
          include: ['tests/e2e/**/*.test.ts'],
          environment: 'node',
          setupFiles: ['tests/setup-server.ts'],
          fileParallelism: false,
          testTimeout: 90_000,
          hookTimeout: 180_000,
        },
      },
    ],
  },
});
