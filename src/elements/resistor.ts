import type { AdmittanceKernel, ElementType } from './types.js';

/** y = 1/R (parameters: R). */
const kernel: AdmittanceKernel = {
  stride: 1,
  constant: true,
  run(_w, _at, p, count, out, offset) {
    for (let k = 0; k < count; k++) {
      out[2 * (offset + k)] = 1 / p[k]!;
      out[2 * (offset + k) + 1] = 0;
    }
  },
};

/** An ideal resistor. */
export const resistor: ElementType = {
  keyword: 'resistor',
  summary: 'ideal resistor between terminals a and b',
  example: 'resistor rload a=out b=ground value=50 ohm',
  terminals: [
    { key: 'a', doc: 'first terminal' },
    { key: 'b', doc: 'second terminal' },
  ],
  properties: [
    { key: 'value', unit: 'ohm', quantity: 'resistance', required: true, sign: 'nonzero', doc: 'resistance' },
  ],
  compile(el, b) {
    b.admittance(el.nodes[0]!, el.nodes[1]!, kernel, [el.props.value!]);
    return undefined;
  },
};
