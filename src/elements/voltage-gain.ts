import type { ElementType } from './types.js';

/**
 * A voltage-controlled voltage source: v(p, n) = gain·v(cp, cn). The control terminals draw no
 * current; the output is an ideal voltage source (a short to small signals when gain·v(cp,cn) = 0).
 *
 * Stamp: a branch unknown i, the current into the element at p and out at n: KCL rows p (+i) and
 * n (−i), and the branch row v_p − v_n − gain·(v_cp − v_cn) = 0.
 */
export const voltageGain: ElementType = {
  keyword: 'voltage_gain',
  summary: 'ideal voltage amplifier: v(p,n) = gain·v(cp,cn); the control terminals draw no current',
  example: 'voltage_gain e1 p=x cp=in gain=10',
  terminals: [
    { key: 'p', doc: 'output, plus' },
    { key: 'n', doc: 'output, minus', defaultNode: 'ground' },
    { key: 'cp', doc: 'control voltage, plus side' },
    { key: 'cn', doc: 'control voltage, minus side', defaultNode: 'ground' },
  ],
  // the output sets v(p,n); the control terminals draw no current and join nothing
  connections: [[0, 1]],
  properties: [
    { key: 'gain', unit: null, quantity: 'voltage gain', required: true, doc: 'voltage gain v(p,n)/v(cp,cn)' },
  ],
  validate(el, fail) {
    if (el.nodes[0] === el.nodes[1]) fail('the output terminals `p` and `n` are on the same node, so the output voltage cannot be set', 'p', 'connect `p` and `n` to different nodes');
  },
  compile(el, b) {
    const [p, n, cp, cn] = el.nodes as [number, number, number, number];
    const i = b.branch(`output current of ${el.name}`);
    const mu = el.props.gain!;
    const s = Int32Array.of(b.entry(p, i), b.entry(n, i), b.entry(i, p), b.entry(i, n), b.entry(i, cp), b.entry(i, cn));
    const w = Float64Array.of(1, -1, 1, -1, -mu, mu);
    return (_omega, v) => {
      for (let k = 0; k < 6; k++) {
        const q = s[k]!;
        if (q >= 0) v[2 * q] += w[k]!;
      }
    };
  },
};
