import type { Circuit } from '../elaborate/circuit.js';
import { ELEMENTS } from '../elements/registry.js';
import { addAdmittance, admittanceSlots } from '../elements/stamp.js';
import { GROUND, type StampBuilder, type Stamper } from '../elements/types.js';

/**
 * The stamp plan of a circuit: the unknowns, the fixed sparsity pattern (one slot per distinct
 * matrix entry), and one stamper per element that adds its values into those slots at a given
 * frequency. It is built once per circuit; the sweep only runs the stampers.
 *
 * Ports are terminated in their reference impedances (a conductance 1/Zref across each port), so
 * the system is the one whose solution gives the incident/reflected power waves directly; see
 * `solve/sweep.ts`.
 */
export interface StampPlan {
  /** Number of unknowns: node voltages first, then branch currents. */
  size: number;
  /** Unknown index of each circuit node, or GROUND for ground and local references. */
  nodeUnknown: Int32Array;
  /** What each unknown is, for messages: a node name or a branch description. */
  unknownNames: string[];
  /** The circuit node of each unknown, or -1 for a branch current. */
  unknownNode: Int32Array;
  /** Row and column of each slot. */
  slotRow: Int32Array;
  slotCol: Int32Array;
  stampers: Stamper[];
  /** Per port: unknown of its plus and minus terminals (GROUND = -1) and its reference in ohms. */
  portPlus: Int32Array;
  portMinus: Int32Array;
  portReference: Float64Array;
  /** Per port: the reactance of a complex reference impedance in ohms (0 for a real one). */
  portReactance: Float64Array;
  /** The lowest frequency (Hz) the plan may be solved at: elements chose their formulation by it. */
  lowestFrequency: number;
}

export interface PlanOptions {
  /**
   * The lowest frequency (Hz) the plan will be solved at (default: the lowest of the circuit's
   * sweep). Solving below it is refused.
   */
  lowestFrequency?: number;
}

/** The lowest of a list of frequencies (0 for an empty list). */
export function lowestOf(freqs: ArrayLike<number>): number {
  let lo = Infinity;
  for (let k = 0; k < freqs.length; k++) if (freqs[k]! < lo) lo = freqs[k]!;
  return lo === Infinity ? 0 : Math.max(0, lo);
}

/** Builds the stamp plan: assigns unknowns, fixes the pattern and compiles every element. */
export function buildPlan(circuit: Circuit, options: PlanOptions = {}): StampPlan {
  const lowestFrequency = Math.max(0, options.lowestFrequency ?? lowestOf(circuit.frequencies));
  const nodeUnknown = new Int32Array(circuit.nodeNames.length);
  const unknownNames: string[] = [];
  const local = new Set(circuit.localReferences);
  for (let i = 0; i < circuit.nodeNames.length; i++) {
    if (local.has(i)) {
      nodeUnknown[i] = GROUND;
      continue;
    }
    nodeUnknown[i] = unknownNames.length;
    unknownNames.push(circuit.nodeNames[i]!);
  }
  const toUnknown = (node: number) => (node === GROUND ? GROUND : nodeUnknown[node]!);

  // Slots are handed out in order of first use; entries touching ground get no slot.
  const slotIndex = new Map<number, number>();
  const rows: number[] = [];
  const cols: number[] = [];
  // Branches are numbered after the nodes; their final index is known only at the end,
  // so stampers refer to unknowns through this builder while compiling.
  const branchNames: string[] = [];
  const nodeCount = unknownNames.length;
  const builder: StampBuilder = {
    branch(label) {
      branchNames.push(label);
      return nodeCount + branchNames.length - 1;
    },
    entry(row, col) {
      if (row < 0 || col < 0) return -1;
      // key on (row, col); sizes stay far below 2^26 unknowns
      const key = row * 67108864 + col;
      let s = slotIndex.get(key);
      if (s === undefined) {
        s = rows.length;
        slotIndex.set(key, s);
        rows.push(row);
        cols.push(col);
      }
      return s;
    },
    lowestOmega: 2 * Math.PI * lowestFrequency,
  };

  const stampers: Stamper[] = [];
  for (const el of circuit.elements) {
    const type = ELEMENTS.get(el.type)!;
    const mapped = { ...el, nodes: el.nodes.map(toUnknown) };
    stampers.push(type.compile(mapped, builder));
  }
  const portPlus = new Int32Array(circuit.ports.length);
  const portMinus = new Int32Array(circuit.ports.length);
  const portReference = new Float64Array(circuit.ports.length);
  const portReactance = new Float64Array(circuit.ports.length);
  circuit.ports.forEach((p, k) => {
    portPlus[k] = toUnknown(p.plus);
    portMinus[k] = toUnknown(p.minus);
    portReference[k] = p.reference;
    portReactance[k] = p.reactance ?? 0;
    const s = admittanceSlots(builder, portPlus[k]!, portMinus[k]!);
    // termination 1/Zref, Zref = R + jX
    const d = p.reference * p.reference + portReactance[k]! * portReactance[k]!;
    const gr = p.reference / d;
    const gi = -portReactance[k]! / d;
    stampers.push((_omega, v) => addAdmittance(v, s, gr, gi));
  });
  // Every unknown gets its diagonal slot, so that the pattern is structurally square.
  const size = nodeCount + branchNames.length;
  for (let i = 0; i < size; i++) builder.entry(i, i);
  const unknownNode = new Int32Array(size).fill(-1);
  for (let i = 0; i < nodeUnknown.length; i++) if (nodeUnknown[i]! >= 0) unknownNode[nodeUnknown[i]!] = i;
  return {
    size,
    nodeUnknown,
    unknownNames: [...unknownNames, ...branchNames],
    unknownNode,
    slotRow: Int32Array.from(rows),
    slotCol: Int32Array.from(cols),
    stampers,
    portPlus,
    portMinus,
    portReference,
    portReactance,
    lowestFrequency,
  };
}
