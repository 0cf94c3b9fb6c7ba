import type { AdmittanceKernel, ElementType } from './types.js';

/** Y = jωC / (1 + jωC·R) = (ω²C²R + jωC) / (1 + (ωCR)²) (parameters: C, R). */
const kernel: AdmittanceKernel = {
  stride: 2,
  run(w, at, p, count, out, offset) {
    const omega = w[at]!;
    let o = 2 * offset;
    for (let k = 0; k < 2 * count; k += 2) {
      const wc = omega * p[k]!;
      const wcr = wc * p[k + 1]!;
      const d = 1 / (1 + wcr * wcr);
      out[o] = wc * wcr * d;
      out[o + 1] = wc * d;
      o += 2;
    }
  },
};

/**
 * A capacitor, optionally lossy through a series resistance (ESR): either given directly (`esr=`)
 * or from a quality factor at a stated frequency (`q=Q at f0`), which sets ESR = 1/(2π·f0·C·Q).
 * The ESR is then held constant over frequency, so the model's Q falls as 1/f away from f0.
 *
 * Admittance: Y = jωC / (1 + jωC·ESR).
 */
export const capacitor: ElementType = {
  keyword: 'capacitor',
  summary: 'capacitor between terminals a and b, with optional series loss (esr, or q at a frequency)',
  example: 'capacitor cshunt a=mid b=ground value=6.8 pF q=300 at 433 MHz',
  terminals: [
    { key: 'a', doc: 'first terminal' },
    { key: 'b', doc: 'second terminal' },
  ],
  properties: [
    { key: 'value', unit: 'F', quantity: 'capacitance', required: true, sign: 'positive', doc: 'capacitance' },
    { key: 'esr', unit: 'ohm', quantity: 'resistance', sign: 'nonnegative', doc: 'equivalent series resistance' },
    { key: 'q', unit: null, quantity: 'quality factor', takesAt: true, sign: 'positive', doc: 'quality factor at the frequency after `at`' },
  ],
  validate(el, fail) {
    if (el.props.esr !== undefined && el.props.q !== undefined) {
      fail('give the loss either as `esr` or as `q`, not both', 'q');
    }
    if (el.props.q !== undefined && !(el.at.q! > 0)) fail('the frequency after `at` must be above 0 Hz', 'q');
  },
  openAt: (_el, omega) => omega === 0,
  compile(el, b) {
    const c = el.props.value!;
    const q = el.props.q;
    const r = q !== undefined ? 1 / (2 * Math.PI * el.at.q! * c * q) : (el.props.esr ?? 0);
    b.admittance(el.nodes[0]!, el.nodes[1]!, kernel, [c, r]);
    return undefined;
  },
};
