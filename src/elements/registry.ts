import { capacitor } from './capacitor.js';
import { conductance } from './conductance.js';
import { inductor } from './inductor.js';
import { resistor } from './resistor.js';
import type { ElementType } from './types.js';

/** Every element type, by keyword. Adding an element: write its file, add one line here. */
export const ELEMENTS: ReadonlyMap<string, ElementType> = new Map(
  [resistor, conductance, capacitor, inductor].map((e) => [e.keyword, e]),
);
