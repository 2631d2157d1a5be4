// Worker bootstrap: the TypeScript loader must be registered in each thread before the worker loads.
import { register } from 'tsx/esm/api';

register();
await import('./worker.ts');
