// Worker bootstrap of pipeline/matrix-threads.ts: the TypeScript loader is registered in each thread before the worker loads.
import { register } from 'tsx/esm/api';

register();
await import('./matrix-worker.ts');
