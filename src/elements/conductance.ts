import { addAdmittance, admittanceSlots } from './stamp.js';
import type { ElementType } from './types.js';

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
    const s = admittanceSlots(b, el.nodes[0]!, el.nodes[1]!);
    const g = el.props.value!;
    return (_omega, v) => addAdmittance(v, s, g, 0);
  },
};
