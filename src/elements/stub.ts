import { lineGammaLength, type TemLine } from '../models/line.js';
import { addSlot, currentScale, TEM_SECTION_PROPERTIES, temSectionOf, temSectionWarnings, validateTemSection } from './line.js';
import type { ElementType, StampBuilder, TerminalSpec } from './types.js';

/**
 * Open-circuited and short-circuited stubs: a TEM section (the model of src/models/line.ts, keys
 * as for `line`) whose near end is across terminals a and b and whose far end is internal — open
 * or shorted. With b on ground (its default) the stub is a shunt stub at a; with b on another node
 * it is a series stub between a and b.
 *
 * Both are stamped in the wave form of `line` (src/elements/line.ts) with two extra unknowns, so
 * they stay finite at every frequency, including the frequencies where their input impedance or
 * admittance is zero or infinite (0 Hz, a quarter wave, a half wave), and at any loss (every
 * coefficient is bounded by one). V1 = v(a) − v(b), I1 the current into the stub at a (out at b),
 * u1 = Z0·I1 (in the stamp u = zs·I with zs the power of two nearest to Z0, see `currentScale`),
 * E = e^(−γℓ); the waves at the far end obey V2 − Z0·I2 = E·(V1 + Z0·I1) and at the
 * near end V1 − Z0·I1 = E·(V2 + Z0·I2) (common practice: a matched section delays and attenuates
 * each wave by e^(−γℓ)):
 * - open end (I2 = 0), unknowns u1 and the far-end voltage V2:
 *     V1 − u1 − E·V2 = 0,   V2 − E·V1 − E·u1 = 0;
 * - shorted end (V2 = 0), unknowns u1 and u2 = Z0·I2 (I2 the current into the section at the far
 *   end, i.e. minus the current through the short):
 *     V1 − u1 − E·u2 = 0,   −u2 − E·V1 − E·u1 = 0;
 * and KCL +I1 at a, −I1 at b.
 */

const TWO_PI = 2 * Math.PI;

const STUB_TERMINALS: readonly TerminalSpec[] = [
  { key: 'a', doc: 'first input terminal' },
  { key: 'b', doc: 'second input terminal (ground, the default, makes a shunt stub)', defaultNode: 'ground' },
];

/**
 * Slots: 0 [a,u1] 1 [b,u1] 2 [u1,a] 3 [u1,b] 4 [u1,u1] 5 [u1,x] 6 [x,x] 7 [x,a] 8 [x,b] 9 [x,u1],
 * x = V2 (open) or u2 (short).
 */
function stubSlots(builder: StampBuilder, a: number, b: number, name: string, far: string): Int32Array {
  const u1 = builder.branch(`current into ${name}`);
  const x = builder.branch(`${far} of ${name}`);
  const e = (r: number, c: number) => builder.entry(r, c);
  return Int32Array.of(e(a, u1), e(b, u1), e(u1, a), e(u1, b), e(u1, u1), e(u1, x), e(x, x), e(x, a), e(x, b), e(x, u1));
}

function compileStub(section: TemLine, s: Int32Array, open: boolean): (omega: number, v: Float64Array) => void {
  // branch currents scaled by zs, the power of two nearest to Z0: u = zs·I, Z0·I = r·u, 1/zs and r exact
  const zs = currentScale(section.z0);
  const g = 1 / zs;
  const r = section.z0 / zs;
  const gl = new Float64Array(2);
  const far = open ? 1 : -1; // V2 (open) or −u2 (short) in the far-end row
  return (omega, v) => {
    lineGammaLength(section, omega / TWO_PI, gl, 0);
    // E = e^(−γℓ), bounded by one; underflows gracefully to 0 for a large loss
    const ea = Math.exp(-gl[0]!);
    const er = ea * Math.cos(gl[1]!);
    const ei = -ea * Math.sin(gl[1]!);
    addSlot(v, s[0]!, g, 0);
    addSlot(v, s[1]!, -g, 0);
    // V1 − r·u1 − E·x' = 0, x' = V2 (open) or r·u2 (short)
    const xs = open ? 1 : r;
    addSlot(v, s[2]!, 1, 0);
    addSlot(v, s[3]!, -1, 0);
    addSlot(v, s[4]!, -r, 0);
    addSlot(v, s[5]!, -er * xs, -ei * xs);
    // ±x' − E·V1 − E·r·u1 = 0
    addSlot(v, s[6]!, far * xs, 0);
    addSlot(v, s[7]!, -er, -ei);
    addSlot(v, s[8]!, er, ei);
    addSlot(v, s[9]!, -er * r, -ei * r);
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
