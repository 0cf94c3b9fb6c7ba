import { capacitor } from './capacitor.js';
import { conductance } from './conductance.js';
import { datafile } from './datafile.js';
import { inductor } from './inductor.js';
import { resistor } from './resistor.js';
import { currentGain } from './current-gain.js';
import { gyrator } from './gyrator.js';
import { transconductance } from './transconductance.js';
import { transformer } from './transformer.js';
import { transresistance } from './transresistance.js';
import { voltageGain } from './voltage-gain.js';
import { coupledLines } from './coupled-lines.js';
import { line } from './line.js';
import { microstrip } from './microstrip.js';
import { openStub, shortStub } from './stub.js';
import type { ElementType } from './types.js';

/** Every element type, by keyword. Adding an element: write its file, add one line here. */
const TYPES: ElementType[] = [
  resistor,
  conductance,
  capacitor,
  inductor,
  transformer, gyrator, transconductance, voltageGain, currentGain, transresistance,
  datafile,
  line, openStub, shortStub, coupledLines, microstrip,
];

export const ELEMENTS: ReadonlyMap<string, ElementType> = new Map(TYPES.map((e) => [e.keyword, e]));

/** The node groups an element joins (see ElementType.connections): lists of node indices. */
export function joinedNodes(el: { type: string; nodes: readonly number[] }): number[][] {
  const groups = ELEMENTS.get(el.type)?.connections;
  if (!groups) return [el.nodes.slice()];
  return groups.map((g) => g.map((t) => el.nodes[t]!));
}

/**
 * The elements whose data does not cover the band lo…hi (Hz), with their own ranges: measured
 * data blocks that would have to extrapolate (to 1e-9 relative).
 */
export function outsideRange<E extends { type: string }>(elements: readonly E[], lo: number, hi: number): { element: E; range: [number, number] }[] {
  const out: { element: E; range: [number, number] }[] = [];
  for (const el of elements) {
    const range = ELEMENTS.get(el.type)?.frequencyRange?.(el as never);
    if (!range) continue;
    const tol = 1e-9 * Math.max(range[1], 1);
    if (lo < range[0] - tol || hi > range[1] + tol) out.push({ element: el, range });
  }
  return out;
}
