import { lineAbcdFromGammaLength, lineGammaLength, type TemLine } from '../models/line.js';
import { addSlot, TEM_SECTION_PROPERTIES, temSectionOf, temSectionWarnings, validateTemSection } from './line.js';
import type { ElementType, StampBuilder, TerminalSpec } from './types.js';

/**
 * Open-circuited and short-circuited stubs: a TEM section (the model of src/models/line.ts, keys
 * as for `line`) whose near end is across terminals a and b and whose far end is internal — open
 * or shorted. With b on ground (its default) the stub is a shunt stub at a; with b on another node
 * it is a series stub between a and b.
 *
 * Both are stamped from the section's ABCD matrix with two extra unknowns, so they stay finite at
 * every frequency, including the frequencies where their input impedance or admittance is zero or
 * infinite (0 Hz, a quarter wave, a half wave). V1 = v(a) − v(b), I1 the current into the stub at
 * a (out at b), u1 = Z0·I1:
 * - open end (I2 = 0), unknowns u1 and the far-end voltage V2:
 *     V1 − A·V2 = 0,   u1 − (C·Z0)·V2 = 0;
 * - shorted end (V2 = 0), unknowns u1 and u2 = Z0·I2 (I2 the current into the section at the far
 *   end, i.e. minus the current through the short):
 *     V1 + (B/Z0)·u2 = 0,   u1 + D·u2 = 0;
 * and KCL +I1 at a, −I1 at b. (From V1 = A·V2 − B·I2 and I1 = C·V2 − D·I2, common practice.)
 */

const TWO_PI = 2 * Math.PI;

const STUB_TERMINALS: readonly TerminalSpec[] = [
  { key: 'a', doc: 'first input terminal' },
  { key: 'b', doc: 'second input terminal (ground, the default, makes a shunt stub)', defaultNode: 'ground' },
];

/** Slots: 0 [a,u1] 1 [b,u1] 2 [u1,a] 3 [u1,b] 4 [u1,x] 5 [x,u1] 6 [x,x], x = V2 (open) or u2 (short). */
function stubSlots(builder: StampBuilder, a: number, b: number, name: string, far: string): Int32Array {
  const u1 = builder.branch(`current into ${name}`);
  const x = builder.branch(`${far} of ${name}`);
  const e = (r: number, c: number) => builder.entry(r, c);
  return Int32Array.of(e(a, u1), e(b, u1), e(u1, a), e(u1, b), e(u1, x), e(x, u1), e(x, x));
}

function compileStub(section: TemLine, s: Int32Array, open: boolean): (omega: number, v: Float64Array) => void {
  const z0 = section.z0;
  const g = 1 / z0;
  const gl = new Float64Array(2);
  const m = new Float64Array(8);
  return (omega, v) => {
    lineGammaLength(section, omega / TWO_PI, gl, 0);
    lineAbcdFromGammaLength(z0, gl[0]!, gl[1]!, m, 0);
    addSlot(v, s[0]!, g, 0);
    addSlot(v, s[1]!, -g, 0);
    addSlot(v, s[2]!, 1, 0);
    addSlot(v, s[3]!, -1, 0);
    addSlot(v, s[5]!, 1, 0);
    if (open) {
      addSlot(v, s[4]!, -m[0]!, -m[1]!); // −A·V2
      addSlot(v, s[6]!, -m[4]! * z0, -m[5]! * z0); // −(C·Z0)·V2
    } else {
      addSlot(v, s[4]!, m[2]! * g, m[3]! * g); // (B/Z0)·u2
      addSlot(v, s[6]!, m[6]!, m[7]!); // D·u2
    }
  };
}

export const openStub: ElementType = {
  keyword: 'open_stub',
  summary: 'open-circuited TEM stub across a and b (b defaults to ground: a shunt stub)',
  example: 'open_stub tune a=feed z0=50 ohm theta=45 deg at 2.45 GHz',
  terminals: STUB_TERMINALS,
  properties: TEM_SECTION_PROPERTIES,
  validate: validateTemSection,
  warnings: (el) => temSectionWarnings(el),
  // Zin = Z0·coth(γℓ) is infinite at 0 Hz (the model has no DC loss): no DC path between a and b.
  openAt: (_el, omega) => omega === 0,
  compile(el, b) {
    const s = stubSlots(b, el.nodes[0]!, el.nodes[1]!, el.name, 'far-end voltage');
    return compileStub(temSectionOf(el), s, true);
  },
};

export const shortStub: ElementType = {
  keyword: 'short_stub',
  summary: 'short-circuited TEM stub across a and b (b defaults to ground: a shunt stub)',
  example: 'short_stub choke a=bias z0=60 ohm theta=90 deg at 2.45 GHz',
  terminals: STUB_TERMINALS,
  properties: TEM_SECTION_PROPERTIES,
  validate: validateTemSection,
  warnings: (el) => temSectionWarnings(el),
  compile(el, b) {
    const s = stubSlots(b, el.nodes[0]!, el.nodes[1]!, el.name, 'current into the far end');
    return compileStub(temSectionOf(el), s, false);
  },
};
