/**
 * Where the efficiency of a detector stack jumps: the cross-section edges (the table's segment
 * boundaries) of every element in any of its layers, ascending and without repeats.
 */
import { composition } from './compound.ts';
import { tableEdgesKeV } from './elements.ts';
import type { DetectorStack } from './types.ts';

export function stackEdgesKeV(stack: DetectorStack): number[] {
  const formulas = [
    ...stack.filters.map((f) => f.material.formula),
    ...(stack.contamination ? [stack.contamination.material.formula] : []),
    ...stack.surface.map((s) => s.material.formula),
    stack.sensor.material.formula,
  ];
  const edges = new Set<number>();
  for (const f of formulas) for (const p of composition(f).parts) for (const e of tableEdgesKeV(p.symbol)) edges.add(e);
  return [...edges].sort((a, b) => a - b);
}
