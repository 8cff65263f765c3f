// Entry of an engine worker thread. Registers tsx's ESM loader in this thread, then loads the
// TypeScript worker body, so that workers start the same way under `node --import tsx`, `tsx`
// and vitest (whose own transform does not reach worker threads).
import { register } from 'tsx/esm/api';

register();
await import('./worker.ts');
