/**
 * Stand-in for xray-elements.ts in the site's response worker (astro.config.mjs swaps it in for
 * worker bundles only): the element table comes from the model document the worker was given,
 * which carries the data of every element its stacks use, so the generator chunk stays small.
 * The worker sets the table before it loads the generator; the table is fixed for the worker's
 * life (one worker per model document).
 */
import type { XrayTable } from './xray-table-types.ts';
import { RUNTIME_TABLE_KEY } from './xray-runtime-key.ts';

function runtimeTable(): XrayTable {
  const t = (globalThis as Record<string, unknown>)[RUNTIME_TABLE_KEY] as XrayTable | undefined;
  if (!t) throw new Error('element table not set: the response worker must set it from the model document before loading the generator');
  return t;
}

export const XRAY_TABLE: XrayTable = runtimeTable();
