import { lineAbcdFromGammaLength, SPEED_OF_LIGHT } from '../models/line.js';
import { addSlot } from './line.js';
import type { ElementType } from './types.js';

/**
 * A symmetric pair of coupled TEM lines over a common ground, as a four-terminal-pair element:
 * line 1 from a1 to b1, line 2 from a2 to b2, both ends referred to ground. Lossless.
 *
 * Model: even/odd-mode decomposition of a symmetric pair (common practice, e.g. Pozar, Microwave
 * Engineering, section on coupled lines (from memory)). With V1, V2 the voltages of the two lines
 * and I1, I2 their currents at one end,
 *   V1 = Ve + Vo, V2 = Ve − Vo, I1 = Ie + Io, I2 = Ie − Io,
 * and each mode is an independent TEM line: the even mode with impedance Z0e (the impedance of
 * one line to ground when both carry the same voltage), the odd mode with Z0o. The electrical
 * length is `theta` at a frequency (the same for both modes, a homogeneous medium), or the modes
 * have their own phase velocities from `length`, `eeff_e` and `eeff_o` (default 1, air), as on an
 * inhomogeneous substrate (coupled microstrip).
 *
 * Stamp: per mode m (e, o) the chain form of the mode's line between its values at end a and end
 * b, Vm(a) − Am·Vm(b) + Bm·Im(b) = 0 and Im(a) − Cm·Vm(b) + Dm·Im(b) = 0, with Im at each end the
 * mode current into the pair. Four branch unknowns, the mode currents scaled by their impedance
 * (u = Z0m·Im, volts): ue_a, uo_a, ue_b, uo_b. KCL: the current into a1 is Ie(a) + Io(a), into a2
 * Ie(a) − Io(a), and the same at the b end. Finite at every frequency (0 Hz, half waves).
 */

const TWO_PI = 2 * Math.PI;

export const coupledLines: ElementType = {
  keyword: 'coupled_lines',
  summary: 'symmetric coupled pair of TEM lines (a1–b1 and a2–b2 over ground), from even- and odd-mode impedances',
  example: 'coupled_lines cpl a1=in b1=thru a2=cpl b2=iso z0e=69.5 ohm z0o=36 ohm theta=90 deg at 2.45 GHz',
  terminals: [
    { key: 'a1', doc: 'line 1, first end' },
    { key: 'b1', doc: 'line 1, second end' },
    { key: 'a2', doc: 'line 2, first end (beside a1)' },
    { key: 'b2', doc: 'line 2, second end (beside b1)' },
  ],
  properties: [
    { key: 'z0e', unit: 'ohm', quantity: 'impedance', required: true, sign: 'positive', doc: 'even-mode characteristic impedance' },
    { key: 'z0o', unit: 'ohm', quantity: 'impedance', required: true, sign: 'positive', doc: 'odd-mode characteristic impedance' },
    {
      key: 'theta',
      unit: 'rad',
      quantity: 'angle',
      takesAt: true,
      sign: 'positive',
      doc: 'electrical length of both modes at the frequency after `at` (write `90 deg`; a bare number is in radians)',
    },
    { key: 'length', unit: 'm', quantity: 'length', sign: 'positive', doc: 'physical length' },
    { key: 'eeff_e', unit: null, quantity: 'effective permittivity', doc: 'even-mode effective permittivity (≥ 1), with `length`; default 1' },
    { key: 'eeff_o', unit: null, quantity: 'effective permittivity', doc: 'odd-mode effective permittivity (≥ 1), with `length`; default 1' },
  ],
  validate(el, fail) {
    const p = el.props;
    if (p.z0e! < p.z0o!) {
      fail('`z0e` must be at least `z0o` (the even mode of a coupled pair has the higher impedance)', 'z0e', 'check whether the two are swapped');
    }
    if (p.theta === undefined && p.length === undefined) {
      fail('give the length either as `theta` (electrical length at a frequency) or as `length`', undefined, 'e.g. `theta=90 deg at 2.45 GHz`');
    }
    if (p.theta !== undefined && p.length !== undefined) fail('give either `theta` or `length`, not both', 'length');
    if (p.theta !== undefined && !(el.at.theta! > 0)) fail('the frequency after `at` must be above 0 Hz', 'theta');
    for (const key of ['eeff_e', 'eeff_o'] as const) {
      if (p[key] === undefined) continue;
      if (p.theta !== undefined) fail(`\`${key}\` sets the phase of a \`length\`; with \`theta\` the phase is given already`, key);
      if (!(p[key] >= 1)) fail(`\`${key}\` must be 1 or more`, key);
    }
  },
  compile(el, builder) {
    const p = el.props;
    const [a1, b1, a2, b2] = el.nodes as [number, number, number, number];
    const ze = p.z0e!;
    const zo = p.z0o!;
    // phase of each mode per hertz, rad/Hz
    let phe: number;
    let pho: number;
    if (p.theta !== undefined) {
      phe = pho = p.theta / el.at.theta!;
    } else {
      phe = (TWO_PI * Math.sqrt(p.eeff_e ?? 1) * p.length!) / SPEED_OF_LIGHT;
      pho = (TWO_PI * Math.sqrt(p.eeff_o ?? 1) * p.length!) / SPEED_OF_LIGHT;
    }
    const uea = builder.branch(`even-mode current into ${el.name} at a1/a2`);
    const uoa = builder.branch(`odd-mode current into ${el.name} at a1/a2`);
    const ueb = builder.branch(`even-mode current into ${el.name} at b1/b2`);
    const uob = builder.branch(`odd-mode current into ${el.name} at b1/b2`);
    const e = (r: number, c: number) => builder.entry(r, c);
    // KCL (rows a1, a2, b1, b2) and the four mode rows (uea, ueb: even; uoa, uob: odd).
    const s = Int32Array.of(
      // 0..7 KCL: [a1,uea] [a1,uoa] [a2,uea] [a2,uoa] [b1,ueb] [b1,uob] [b2,ueb] [b2,uob]
      e(a1, uea), e(a1, uoa), e(a2, uea), e(a2, uoa), e(b1, ueb), e(b1, uob), e(b2, ueb), e(b2, uob),
      // 8..12 even row 1: [uea,a1] [uea,a2] [uea,b1] [uea,b2] [uea,ueb]
      e(uea, a1), e(uea, a2), e(uea, b1), e(uea, b2), e(uea, ueb),
      // 13..16 even row 2: [ueb,uea] [ueb,b1] [ueb,b2] [ueb,ueb]
      e(ueb, uea), e(ueb, b1), e(ueb, b2), e(ueb, ueb),
      // 17..21 odd row 1: [uoa,a1] [uoa,a2] [uoa,b1] [uoa,b2] [uoa,uob]
      e(uoa, a1), e(uoa, a2), e(uoa, b1), e(uoa, b2), e(uoa, uob),
      // 22..25 odd row 2: [uob,uoa] [uob,b1] [uob,b2] [uob,uob]
      e(uob, uoa), e(uob, b1), e(uob, b2), e(uob, uob),
    );
    const m = new Float64Array(16); // even ABCD at 0, odd ABCD at 8
    const ge = 1 / ze;
    const go = 1 / zo;
    return (omega, v) => {
      const f = omega / TWO_PI;
      lineAbcdFromGammaLength(ze, 0, phe * f, m, 0);
      lineAbcdFromGammaLength(zo, 0, pho * f, m, 8);
      // KCL: I1 = Ie + Io, I2 = Ie − Io at each end (I = u/Z0m)
      addSlot(v, s[0]!, ge, 0);
      addSlot(v, s[1]!, go, 0);
      addSlot(v, s[2]!, ge, 0);
      addSlot(v, s[3]!, -go, 0);
      addSlot(v, s[4]!, ge, 0);
      addSlot(v, s[5]!, go, 0);
      addSlot(v, s[6]!, ge, 0);
      addSlot(v, s[7]!, -go, 0);
      // even: (Va1 + Va2)/2 − Ae·(Vb1 + Vb2)/2 + (Be/Z0e)·ue_b = 0
      addSlot(v, s[8]!, 0.5, 0);
      addSlot(v, s[9]!, 0.5, 0);
      addSlot(v, s[10]!, -0.5 * m[0]!, -0.5 * m[1]!);
      addSlot(v, s[11]!, -0.5 * m[0]!, -0.5 * m[1]!);
      addSlot(v, s[12]!, m[2]! * ge, m[3]! * ge);
      // even: ue_a − (Ce·Z0e)·(Vb1 + Vb2)/2 + De·ue_b = 0
      addSlot(v, s[13]!, 1, 0);
      addSlot(v, s[14]!, -0.5 * m[4]! * ze, -0.5 * m[5]! * ze);
      addSlot(v, s[15]!, -0.5 * m[4]! * ze, -0.5 * m[5]! * ze);
      addSlot(v, s[16]!, m[6]!, m[7]!);
      // odd: (Va1 − Va2)/2 − Ao·(Vb1 − Vb2)/2 + (Bo/Z0o)·uo_b = 0
      addSlot(v, s[17]!, 0.5, 0);
      addSlot(v, s[18]!, -0.5, 0);
      addSlot(v, s[19]!, -0.5 * m[8]!, -0.5 * m[9]!);
      addSlot(v, s[20]!, 0.5 * m[8]!, 0.5 * m[9]!);
      addSlot(v, s[21]!, m[10]! * go, m[11]! * go);
      // odd: uo_a − (Co·Z0o)·(Vb1 − Vb2)/2 + Do·uo_b = 0
      addSlot(v, s[22]!, 1, 0);
      addSlot(v, s[23]!, -0.5 * m[12]! * zo, -0.5 * m[13]! * zo);
      addSlot(v, s[24]!, 0.5 * m[12]! * zo, 0.5 * m[13]! * zo);
      addSlot(v, s[25]!, m[14]!, m[15]!);
    };
  },
};
