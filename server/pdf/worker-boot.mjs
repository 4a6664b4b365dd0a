// The entry of each PDF worker thread. It loads the TypeScript worker through tsx's API because
// on Node 20 a worker's `execArgv: ['--import', 'tsx']` does not make tsx load the worker's own
// .ts entry ("Unknown file extension .ts", tried on Node 20.20), both under `tsx server/index.ts`
// and under Vitest.
import { tsImport } from 'tsx/esm/api';

await tsImport('./worker.ts', import.meta.url);
