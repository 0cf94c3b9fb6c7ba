import { addBranchImpedance, branchSlots } from './stamp.js';
import type { AdmittanceKernel, ElementType } from './types.js';

/** Y = 1/(R + jωL) = (R − jωL) / (R² + ω²L²) (parameters: L, R). */
const kernel: AdmittanceKernel = {
  stride: 2,
  run(w, at, p, count, out, offset) {
    const omega = w[at]!;
    let o = 2 * offset;
    for (let k = 0; k < 2 * count; k += 2) {
      const wl = omega * p[k]!;
      const r = p[k + 1]!;
      const d = 1 / (r * r + wl * wl);
      out[o] = r * d;
      out[o + 1] = -wl * d;
      o += 2;
    }
  },
};

/**
 * An inductor, optionally lossy through a series resistance: given directly (`rs=`) or from a
 * quality factor at a stated frequency (`q=Q at f0`), which sets Rs = 2π·f0·L/Q, held constant over
 * frequency (so the model's Q rises in proportion to f away from f0).
 *
 * Stamped as the admittance 1/(Rs + jωL) where the sweep keeps its impedance away from zero (see
 * {@link ADMITTANCE_MIN_OHMS}); otherwise with a branch current, so that it is a short at 0 Hz:
 * v_a − v_b = (Rs + jωL)·i.
 * A lossless inductor at exactly 0 Hz is given {@link DC_SHORT_OHMS} of resistance, so that a loop
 * of ideal inductors (two in parallel, say) has a definite current split; its effect on S is far
 * below the solver's rounding (a 1 pΩ short against 50 Ω references moves S by about 4e-14).
 */
export const DC_SHORT_OHMS = 1e-12;
/**
 * Where |Rs + jωL| stays at or above this over the whole sweep, the inductor is stamped as a plain
 * admittance between its nodes (no branch unknown, so a ladder keeps one unknown per node). The
 * admittance is then at most 1000 S; against port terminations of ohms or more this costs at most
 * three or four of the sixteen digits where it matters (our choice).
 */
export const ADMITTANCE_MIN_OHMS = 1e-3;

export const inductor: ElementType = {
  keyword: 'inductor',
  summary: 'inductor between terminals a and b, with optional series loss (rs, or q at a frequency)',
  example: 'inductor lseries a=in b=mid value=22 nH q=45 at 433 MHz',
  terminals: [
    { key: 'a', doc: 'first terminal' },
    { key: 'b', doc: 'second terminal' },
  ],
  properties: [
    { key: 'value', unit: 'H', quantity: 'inductance', required: true, sign: 'positive', doc: 'inductance' },
    { key: 'rs', unit: 'ohm', quantity: 'resistance', sign: 'nonnegative', doc: 'series resistance' },
    { key: 'q', unit: null, quantity: 'quality factor', takesAt: true, sign: 'positive', doc: 'quality factor at the frequency after `at`' },
  ],
  validate(el, fail) {
    if (el.props.rs !== undefined && el.props.q !== undefined) {
      fail('give the loss either as `rs` or as `q`, not both', 'q');
    }
    if (el.props.q !== undefined && !(el.at.q! > 0)) fail('the frequency after `at` must be above 0 Hz', 'q');
  },
  compile(el, b) {
    const l = el.props.value!;
    const q = el.props.q;
    const r = q !== undefined ? (2 * Math.PI * el.at.q! * l) / q : (el.props.rs ?? 0);
    if (Math.hypot(r, b.lowestOmega * l) >= ADMITTANCE_MIN_OHMS) {
      b.admittance(el.nodes[0]!, el.nodes[1]!, kernel, [l, r]);
      return undefined;
    }
    const i = b.branch(`current through ${el.name}`);
    const s = branchSlots(b, el.nodes[0]!, el.nodes[1]!, i);
    const r0 = r > 0 ? r : DC_SHORT_OHMS;
    return (omega, v) => addBranchImpedance(v, s, omega === 0 ? r0 : r, omega * l);
  },
};
