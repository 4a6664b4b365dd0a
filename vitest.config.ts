import { readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { defineConfig } from 'vitest/config';
import vue from '@vitejs/plugin-vue';

// Four projects mirroring the source tree. The browser tests run one file at a time because each
// launches its own Chromium and server on a two-core machine; `npm run test:all` runs them in a
// second Vitest process beside the other three projects.
/**
 * Server tests that need a module graph of their own: the PDF worker pool and the spies on it,
 * the mail they send, the built client's headers. Run together in one graph, their PDFs came
 * back unreadable.
 */
const SERVER_ISOLATED = [
  'tests/server/pdf/**/*.test.ts',
  'tests/server/mail/**/*.test.ts',
  'tests/server/routes/job-time-zone-api.test.ts',
  'tests/server/routes/jobs-api.test.ts',
  'tests/server/routes/plans-api.test.ts',
  'tests/server/routes/records-api.test.ts',
  'tests/server/security/headers.test.ts',
  'tests/server/db/file-permissions.test.ts',
];

/**
 * Client tests that replace a module (vi.mock): a mock must not reach another file's imports.
 * Found by reading the files, so a new test that mocks a module is isolated without a list to keep.
 */
const CLIENT_ISOLATED = readdirSync('tests/client', { recursive: true, encoding: 'utf8' })
  .filter((file) => file.endsWith('.test.ts') && readFileSync(path.join('tests/client', file), 'utf8').includes('vi.mock('))
  .map((file) => path.posix.join('tests/client', file.split(path.sep).join('/')));

const server = {
  include: ['tests/server/**/*.test.ts'],
  environment: 'node' as const,
  setupFiles: ['tests/setup-server.ts'],
  // These walk real jobs through the real server while the browser tests run beside them
  // on two cores: a limit is there to catch a hang, not to time the machine.
  testTimeout: 60_000,
  hookTimeout: 60_000,
};

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
          ...server,
          name: 'server',
          exclude: SERVER_ISOLATED,
          // One module graph for every file instead of one each: importing the server per file
          // took about 200 s of the unit run. Each file still opens its own database and app.
          isolate: false,
        },
      },
      {
        test: { ...server, name: 'server-isolated', include: SERVER_ISOLATED },
      },
      {
        plugins: [vue()],
        // One module graph and one page for the files that mock no module (see CLIENT_ISOLATED).
        test: { name: 'client', include: ['tests/client/**/*.test.ts'], exclude: CLIENT_ISOLATED, environment: 'happy-dom', isolate: false },
      },
      {
        plugins: [vue()],
        test: { name: 'client-isolated', include: CLIENT_ISOLATED, environment: 'happy-dom' },
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
