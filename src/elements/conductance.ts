import type { AdmittanceKernel, ElementType } from './types.js';

/** y = G (parameters: G). */
const kernel: AdmittanceKernel = {
  stride: 1,
  constant: true,
  run(_w, _at, p, count, out, offset) {
    for (let k = 0; k < count; k++) {
      out[2 * (offset + k)] = p[k]!;
      out[2 * (offset + k) + 1] = 0;
    }
  },
};

/** An ideal conductance (a resistor given in siemens; zero is allowed and means an open). */
export const conductance: ElementType = {
  keyword: 'conductance',
  summary: 'ideal conductance between terminals a and b',
  example: 'conductance gleak a=bias b=ground value=20 uS',
  terminals: [
    { key: 'a', doc: 'first terminal' },
    { key: 'b', doc: 'second terminal' },
  ],
  properties: [{ key: 'value', unit: 'S', quantity: 'conductance', required: true, doc: 'conductance' }],
  openAt: (el) => el.props.value === 0,
  compile(el, b) {
    b.admittance(el.nodes[0]!, el.nodes[1]!, kernel, [el.props.value!]);
    return undefined;
  },
};
