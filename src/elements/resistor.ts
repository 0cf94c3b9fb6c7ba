import { addAdmittance, admittanceSlots } from './stamp.js';
import type { ElementType } from './types.js';

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
    const s = admittanceSlots(b, el.nodes[0]!, el.nodes[1]!);
    const g = 1 / el.props.value!;
    return (_omega, v) => addAdmittance(v, s, g, 0);
  },
};
