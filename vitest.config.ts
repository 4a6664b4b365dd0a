import { defineConfig } from 'vitest/config';
import vue from '@vitejs/plugin-vue';

// Four projects mirroring the source tree. The browser tests run one file at a time because each
// launches its own Chromium and server on a two-core machine; `npm run test:all` runs them in a
// second Vitest process beside the other three projects.
export default defineConfig({
  test: {
    projects: [
      {
        test: {
          name: 'shared',
          include: ['tests/shared/**/*.test.ts'],
          environment: 'node',
          // Pure code with no module state to leak between files: one module graph for them all
          // instead of one per file (the imports took 25 s of the project's 52 s).
          isolate: false,
        },
      },
      {
        test: {
          name: 'server',
          include: ['tests/server/**/*.test.ts'],
          environment: 'node',
          setupFiles: ['tests/setup-server.ts'],
          // These walk real jobs through the real server while the browser tests run beside them
          // on two cores: a limit is there to catch a hang, not to time the machine.
          testTimeout: 60_000,
          hookTimeout: 60_000,
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
