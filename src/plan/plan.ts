import type { Circuit } from '../elaborate/circuit.js';
import { ELEMENTS } from '../elements/registry.js';
import { addAdmittance, admittanceSlots } from '../elements/stamp.js';
import { GROUND, type AdmittanceKernel, type ElementInstance, type StampBuilder, type Stamper } from '../elements/types.js';

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
  /**
   * Per-frequency stampers of the elements not batched by kernel, run after the slot values are
   * set to {@link StampPlan.baseValues} and the batch is stamped (see {@link stampAt}).
   */
  stampers: Stamper[];
  /** The element name of each stamper in {@link StampPlan.stampers} (for messages). */
  stamperNames: string[];
  /** The kernel-batched admittances that vary with frequency (resistors, capacitors, inductors…). */
  batch: AdmittanceBatch | undefined;
  /** The frequency-independent part of the slot values (resistors, port terminations). */
  baseValues: Float64Array;
  /**
   * The same part before its contributions were summed into slots: per contribution its slot and
   * value (complex interleaved), in the order they were added. For sums without rounding
   * (`solve/refine.ts`).
   */
  baseParts: { slots: Int32Array; values: Float64Array };
  /** Per port: unknown of its plus and minus terminals (GROUND = -1) and its reference in ohms. */
  portPlus: Int32Array;
  portMinus: Int32Array;
  portReference: Float64Array;
  /** Per port: the reactance of a complex reference impedance in ohms (0 for a real one). */
  portReactance: Float64Array;
  /** Per port: the termination admittance 1/Zref as stamped (complex interleaved), S. */
  portTermination: Float64Array;
  /**
   * Per port: the rounding error of {@link StampPlan.portTermination}, 1/Zref − portTermination
   * (to double precision): with it the termination is exact to about 32 digits (`solve/refine.ts`).
   */
  portTerminationLo: Float64Array;
  /** The lowest frequency (Hz) the plan may be solved at: elements chose their formulation by it. */
  lowestFrequency: number;
  /**
   * Whether the matrix is symmetric at every frequency: no per-element stampers, the batched
   * admittances stamped symmetrically (as they always are) and the constant part symmetric entry by
   * entry. Reciprocal networks of R, L, C and lines batched by kernel are; the sparse solver then
   * needs only forward sweeps for the port voltages (see `solve/sparse/symmetric.ts`).
   */
  symmetric: boolean;
  /**
   * What {@link restampElements} needs to give elements new values on the same pattern: kept only
   * for the elements whose numbers follow design variables (Circuit.bindings).
   */
  replay?: PlanReplay;
}

/** One element's share of the plan, recorded as it was compiled. */
interface ElementRecord {
  /** Its index in {@link StampPlan.stampers}, or -1. */
  stamper: number;
  /** The branch unknowns it asked for, in order. */
  branches: number[];
  /** Its kernel-batched admittances, in order: the kernel and the element's place in its group. */
  placements: { kernel: AdmittanceKernel; k: number }[];
}

/** The frequency-independent admittances: port terminations and constant kernels (see {@link fillBase}). */
interface ConstantGroup {
  kernel: AdmittanceKernel;
  params: Float64Array;
  count: number;
  quads: number[];
  plus: number[];
  minus: number[];
}

interface Termination {
  s: Int32Array;
  gr: number;
  gi: number;
}

export interface PlanReplay {
  slots: SlotTable;
  records: Map<number, ElementRecord>;
  /** Each kernel's parameter array (shared with the batch, so that new values reach the sweep). */
  params: Map<AdmittanceKernel, Float64Array>;
  constants: ConstantGroup[];
  terminations: Termination[];
}

/** The new values of some elements do not fit the plan's pattern (an element chose another formulation). */
export class PatternChangedError extends Error {
  constructor(element: string) {
    super(`the new values of \`${element}\` change the stamp pattern`);
    this.name = 'PatternChangedError';
  }
}

export interface PlanOptions {
  /**
   * The lowest frequency (Hz) the plan will be solved at (default: the lowest of the circuit's
   * sweep). Solving below it is refused.
   */
  lowestFrequency?: number;
  /** Elements (indices into Circuit.elements) that {@link restampElements} may later be given. */
  replayable?: ReadonlySet<number>;
}

/** The lowest of a list of frequencies (0 for an empty list). */
export function lowestOf(freqs: ArrayLike<number>): number {
  let lo = Infinity;
  for (let k = 0; k < freqs.length; k++) if (freqs[k]! < lo) lo = freqs[k]!;
  return lo === Infinity ? 0 : Math.max(0, lo);
}

/** Slot numbers by (row, col): open addressing over typed arrays, for plans of many elements. */
export class SlotTable {
  private rows: Int32Array;
  private cols: Int32Array;
  private values: Int32Array;
  private mask: number;
  private count = 0;
  constructor(expected: number) {
    let cap = 64;
    while (cap < 2 * expected) cap *= 2;
    this.mask = cap - 1;
    this.rows = new Int32Array(cap).fill(-1);
    this.cols = new Int32Array(cap);
    this.values = new Int32Array(cap);
  }
  private slot(row: number, col: number): number {
    let h = (Math.imul(row, 0x9e3779b1) ^ Math.imul(col, 0x85ebca6b)) & this.mask;
    while (this.rows[h] !== -1 && (this.rows[h] !== row || this.cols[h] !== col)) h = (h + 1) & this.mask;
    return h;
  }
  get(row: number, col: number): number {
    const h = this.slot(row, col);
    return this.rows[h] === -1 ? -1 : this.values[h]!;
  }
  set(row: number, col: number, value: number): void {
    if (2 * (this.count + 1) > this.mask + 1) this.grow();
    const h = this.slot(row, col);
    if (this.rows[h] === -1) this.count++;
    this.rows[h] = row;
    this.cols[h] = col;
    this.values[h] = value;
  }
  private grow(): void {
    const { rows, cols, values } = this;
    const cap = 2 * (this.mask + 1);
    this.mask = cap - 1;
    this.rows = new Int32Array(cap).fill(-1);
    this.cols = new Int32Array(cap);
    this.values = new Int32Array(cap);
    for (let h = 0; h < rows.length; h++) {
      if (rows[h] === -1) continue;
      const t = this.slot(rows[h]!, cols[h]!);
      this.rows[t] = rows[h]!;
      this.cols[t] = cols[h]!;
      this.values[t] = values[h]!;
    }
  }
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

  // Kernel-batched admittances: per kernel, the parameters, the elements whose four entries all
  // have slots (element, then the slots of +y, +y, −y, −y), and the (slot, element) pairs that
  // receive +y and −y for the rest (an element with a grounded terminal, say).
  const groups = new Map<AdmittanceKernel, KernelSlots>();
  /** The record of the element being compiled, when it is one to replay. */
  let recording: ElementRecord | undefined;
  let lastKernel: AdmittanceKernel | undefined;
  let lastGroup: KernelSlots | undefined;
  // Slots are handed out in order of first use; entries touching ground get no slot.
  const slots = new SlotTable(4 * circuit.elements.length + 64);
  const rows: number[] = [];
  const cols: number[] = [];
  // Branches are numbered after the nodes; their final index is known only at the end,
  // so stampers refer to unknowns through this builder while compiling.
  const branchNames: string[] = [];
  const nodeCount = unknownNames.length;
  const builder: StampBuilder = {
    branch(label) {
      branchNames.push(label);
      recording?.branches.push(nodeCount + branchNames.length - 1);
      return nodeCount + branchNames.length - 1;
    },
    entry(row, col) {
      if (row < 0 || col < 0) return -1;
      let s = slots.get(row, col);
      if (s < 0) {
        s = rows.length;
        slots.set(row, col, s);
        rows.push(row);
        cols.push(col);
      }
      return s;
    },
    lowestOmega: 2 * Math.PI * lowestFrequency,
    admittance(a, c, kernel, params) {
      let g = kernel === lastKernel ? lastGroup : groups.get(kernel);
      if (!g) groups.set(kernel, (g = { params: [], quads: [], plus: [], minus: [] }));
      lastKernel = kernel;
      lastGroup = g;
      if (params.length !== kernel.stride) throw new Error(`stamp plan: ${params.length} parameters for a kernel of stride ${kernel.stride}`);
      const k = g.params.length / kernel.stride;
      for (let q = 0; q < params.length; q++) g.params.push(params[q]!);
      recording?.placements.push({ kernel, k });
      const saa = this.entry(a, a);
      const sab = this.entry(a, c);
      const sba = this.entry(c, a);
      const scc = this.entry(c, c);
      if (saa >= 0 && scc >= 0 && sab >= 0 && sba >= 0) {
        g.quads.push(k, saa, scc, sab, sba);
        return;
      }
      if (saa >= 0) g.plus.push(saa, k);
      if (scc >= 0) g.plus.push(scc, k);
      if (sab >= 0) g.minus.push(sab, k);
      if (sba >= 0) g.minus.push(sba, k);
    },
  };

  const stampers: Stamper[] = [];
  const stamperNames: string[] = [];
  const replayable = options.replayable;
  const records = new Map<number, ElementRecord>();
  const elements = circuit.elements;
  for (let e = 0; e < elements.length; e++) {
    const el = elements[e]!;
    const type = ELEMENTS.get(el.type)!;
    recording = replayable?.has(e) ? { stamper: -1, branches: [], placements: [] } : undefined;
    const st = type.compile(mappedElement(el, nodeUnknown), builder);
    if (st) {
      if (recording) recording.stamper = stampers.length;
      stampers.push(st);
      stamperNames.push(el.name);
    }
    if (recording) records.set(e, recording);
  }
  recording = undefined;
  const portPlus = new Int32Array(circuit.ports.length);
  const portMinus = new Int32Array(circuit.ports.length);
  const portReference = new Float64Array(circuit.ports.length);
  const portReactance = new Float64Array(circuit.ports.length);
  const terminations: Termination[] = [];
  const portTermination = new Float64Array(2 * circuit.ports.length);
  const portTerminationLo = new Float64Array(2 * circuit.ports.length);
  circuit.ports.forEach((p, k) => {
    portPlus[k] = toUnknown(p.plus);
    portMinus[k] = toUnknown(p.minus);
    portReference[k] = p.reference;
    portReactance[k] = p.reactance ?? 0;
    const s = admittanceSlots(builder, portPlus[k]!, portMinus[k]!);
    // termination 1/Zref, Zref = R + jX (Smith's division: R² + X² would overflow from about 1e154 ohm)
    const r = p.reference;
    const x = portReactance[k]!;
    let gr: number;
    let gi: number;
    if (Math.abs(r) >= Math.abs(x)) {
      const t = x / r;
      const den = r + x * t;
      gr = 1 / den;
      gi = -t / den;
    } else {
      const t = r / x;
      const den = r * t + x;
      gr = t / den;
      gi = -1 / den;
    }
    terminations.push({ s, gr, gi });
    portTermination[2 * k] = gr;
    portTermination[2 * k + 1] = gi;
    // 1/Z − g = (1 − Z·g)/Z, the residual 1 − Z·g formed without rounding its products
    const p1 = r * gr;
    const p2 = x * gi;
    const p3 = r * gi;
    const p4 = x * gr;
    const er = sumOf(1, -p1, -productError(r, gr, p1), p2, productError(x, gi, p2));
    const ei = -sumOf(p3, productError(r, gi, p3), p4, productError(x, gr, p4), 0);
    const m = Math.abs(r) >= Math.abs(x) ? r + x * (x / r) : x + r * (r / x);
    portTerminationLo[2 * k] = Math.abs(r) >= Math.abs(x) ? (er + ei * (x / r)) / m : (er * (r / x) + ei) / m;
    portTerminationLo[2 * k + 1] = Math.abs(r) >= Math.abs(x) ? (ei - er * (x / r)) / m : (ei * (r / x) - er) / m;
  });
  // Every unknown gets its diagonal slot, so that the pattern is structurally square.
  const size = nodeCount + branchNames.length;
  for (let i = 0; i < size; i++) builder.entry(i, i);
  const baseValues = new Float64Array(2 * rows.length);
  const { batch, constants, params } = batchAdmittances(groups);
  const baseParts = fillBase(baseValues, terminations, portTerminationLo, constants);
  const symmetric = stampers.length === 0 && batchSymmetric(groups, rows, cols) && baseSymmetric(baseValues, rows, cols, slots);
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
    stamperNames,
    batch,
    baseValues,
    baseParts,
    portPlus,
    portMinus,
    portReference,
    portReactance,
    portTermination,
    portTerminationLo,
    lowestFrequency,
    symmetric,
    ...(records.size > 0 ? { replay: { slots, records, params, constants, terminations } } : {}),
  };
}

/** The element with its nodes as unknowns (written out: faster than a spread for many elements). */
function mappedElement(el: ElementInstance, nodeUnknown: Int32Array): ElementInstance {
  const nodes = new Array<number>(el.nodes.length);
  for (let t = 0; t < nodes.length; t++) nodes[t] = el.nodes[t] === GROUND ? GROUND : nodeUnknown[el.nodes[t]!]!;
  return { type: el.type, name: el.name, nodes, nodeNames: el.nodeNames, props: el.props, at: el.at, span: el.span, text: el.text, data: el.data };
}

/**
 * Sets the frequency-independent slot values: the port terminations, then the constant kernels,
 * in that order (so that a plan given new values sums exactly as a fresh one). Returns the same
 * contributions unsummed, with the terminations' rounding errors as parts of their own (added
 * without rounding by the refinement, src/solve/refine.ts).
 */
function fillBase(base: Float64Array, terminations: readonly Termination[], lo: Float64Array, constants: readonly ConstantGroup[]): StampPlan['baseParts'] {
  base.fill(0);
  const partSlots: number[] = [];
  const partValues: number[] = [];
  const part = (slot: number, re: number, im: number) => {
    if (slot < 0) return;
    partSlots.push(slot);
    partValues.push(re, im);
  };
  for (const t of terminations) {
    addAdmittance(base, t.s, t.gr, t.gi);
    part(t.s[0]!, t.gr, t.gi);
    part(t.s[1]!, -t.gr, -t.gi);
    part(t.s[2]!, -t.gr, -t.gi);
    part(t.s[3]!, t.gr, t.gi);
  }
  terminations.forEach((t, k) => {
    const lr = lo[2 * k]!;
    const li = lo[2 * k + 1]!;
    if (lr === 0 && li === 0) return;
    part(t.s[0]!, lr, li);
    part(t.s[1]!, -lr, -li);
    part(t.s[2]!, -lr, -li);
    part(t.s[3]!, lr, li);
  });
  for (const g of constants) {
    const y = new Float64Array(2 * g.count);
    g.kernel.run(ZERO, 0, g.params, g.count, y, 0);
    const add = (slot: number, k: number, sign: number) => {
      base[2 * slot] += sign * y[2 * k]!;
      base[2 * slot + 1] += sign * y[2 * k + 1]!;
      part(slot, sign * y[2 * k]!, sign * y[2 * k + 1]!);
    };
    for (let t = 0; t < g.quads.length; t += 5) {
      const k = g.quads[t]!;
      add(g.quads[t + 1]!, k, 1);
      add(g.quads[t + 2]!, k, 1);
      add(g.quads[t + 3]!, k, -1);
      add(g.quads[t + 4]!, k, -1);
    }
    for (let t = 0; t < g.plus.length; t += 2) add(g.plus[t]!, g.plus[t + 1]!, 1);
    for (let t = 0; t < g.minus.length; t += 2) add(g.minus[t]!, g.minus[t + 1]!, -1);
  }
  return { slots: Int32Array.from(partSlots), values: Float64Array.from(partValues) };
}

/**
 * A builder that compiles an element again onto what it had in the plan: its recorded branches
 * in order, the existing slots (a new one would change the pattern: `fail`), and kernel
 * admittances handed to `admittance`.
 */
function replayBuilder(
  r: PlanReplay,
  rec: ElementRecord,
  lowestOmega: number,
  fail: () => Error,
  admittance: StampBuilder['admittance'],
): { builder: StampBuilder; branchesUsed: () => number } {
  let bi = 0;
  const builder: StampBuilder = {
    branch() {
      if (bi >= rec.branches.length) throw fail();
      return rec.branches[bi++]!;
    },
    entry(row, col) {
      if (row < 0 || col < 0) return -1;
      const s = r.slots.get(row, col);
      if (s < 0) throw fail();
      return s;
    },
    lowestOmega,
    admittance,
  };
  return { builder, branchesUsed: () => bi };
}

/**
 * Gives the plan new values for some elements (indices into `circuit.elements`, whose numbers
 * have changed; the plan must have been built with them in `replayable`): each is compiled again
 * onto the slots, branches and kernel places it had, its kernel parameters written in place and
 * its stamper replaced, and the frequency-independent part summed again where it changed. The
 * pattern, the unknowns and everything built on them (a solver's ordering and pivot sequence)
 * stay valid. Throws {@link PatternChangedError} when an element now compiles to another pattern
 * (an inductor that now needs a branch current, say): the plan must then be built afresh.
 */
export function restampElements(plan: StampPlan, circuit: Circuit, changed: Iterable<number>): void {
  const r = plan.replay;
  let constantsChanged = false;
  const lowestOmega = 2 * Math.PI * plan.lowestFrequency;
  for (const e of changed) {
    const el = circuit.elements[e]!;
    const rec = r?.records.get(e);
    if (!r || !rec) throw new PatternChangedError(el.name);
    let pi = 0;
    const fail = () => new PatternChangedError(el.name);
    const { builder, branchesUsed } = replayBuilder(r, rec, lowestOmega, fail, (_a, _c, kernel, params) => {
      const pl = rec.placements[pi++];
      if (!pl || pl.kernel !== kernel) throw fail();
      r.params.get(kernel)!.set(params, pl.k * kernel.stride);
      if (kernel.constant) constantsChanged = true;
    });
    const st = ELEMENTS.get(el.type)!.compile(mappedElement(el, plan.nodeUnknown), builder);
    if (branchesUsed() !== rec.branches.length || pi !== rec.placements.length || (st === undefined) !== (rec.stamper < 0)) throw fail();
    if (st) plan.stampers[rec.stamper] = st;
  }
  if (constantsChanged && r) plan.baseParts = fillBase(plan.baseValues, r.terminations, plan.portTerminationLo, r.constants);
}

/** The sum of five numbers with compensation (Neumaier's summation): error about ε·|sum| + ε²·Σ|terms|. */
function sumOf(a: number, b: number, c: number, d: number, e: number): number {
  let s = 0;
  let comp = 0;
  for (const t of [a, b, c, d, e]) {
    const u = s + t;
    comp += Math.abs(s) >= Math.abs(t) ? s - u + t : t - u + s;
    s = u;
  }
  return s + comp;
}

/** The rounding error of p = fl(a·b): a·b − p exactly (Dekker, 1971, with Veltkamp's splitting). */
function productError(a: number, b: number, p: number): number {
  const SPLIT = 134217729;
  let c = SPLIT * a;
  const a1 = c - (c - a);
  const a2 = a - a1;
  c = SPLIT * b;
  const b1 = c - (c - b);
  const b2 = b - b1;
  return a1 * b1 - p + a1 * b2 + a2 * b1 + a2 * b2;
}

/** Whether the batched admittances stamp symmetrically: four-slot ones do; pairs only on the diagonal. */
function batchSymmetric(groups: Map<AdmittanceKernel, KernelSlots>, rows: number[], cols: number[]): boolean {
  for (const g of groups.values()) {
    if (g.minus.length > 0) return false;
    for (let t = 0; t < g.plus.length; t += 2) if (rows[g.plus[t]!] !== cols[g.plus[t]!]) return false;
  }
  return true;
}

/** Whether the constant slot values are symmetric: every off-diagonal value equals its mirror's (an absent mirror counts as 0). */
function baseSymmetric(base: Float64Array, rows: number[], cols: number[], slots: SlotTable): boolean {
  for (let s = 0; s < rows.length; s++) {
    if (rows[s] === cols[s]) continue;
    const t = slots.get(cols[s]!, rows[s]!);
    const mr = t < 0 ? 0 : base[2 * t]!;
    const mi = t < 0 ? 0 : base[2 * t + 1]!;
    if (base[2 * s] !== mr || base[2 * s + 1] !== mi) return false;
  }
  return true;
}

/** The angular frequency handed to {@link AdmittanceBatch.stamp} by {@link stampAt}. */
const OMEGA = new Float64Array(1);
/** 0 rad/s, for kernels that do not depend on frequency. */
const ZERO = new Float64Array(1);

/** Sets the slot values of the plan's matrix at angular frequency `omega` (no allocation). */
export function stampAt(plan: StampPlan, omega: number, values: Float64Array): void {
  values.set(plan.baseValues);
  OMEGA[0] = omega;
  plan.batch?.stamp(OMEGA, values);
  const st = plan.stampers;
  for (let e = 0; e < st.length; e++) st[e]!(omega, values);
}

/** One kernel's share of the batched admittances. */
interface KernelGroup {
  kernel: AdmittanceKernel;
  params: Float64Array;
  count: number;
  offset: number;
}

/** What the plan builder gathers per kernel (see {@link batchAdmittances}). */
interface KernelSlots {
  params: number[];
  /** Per element with four slots: its index, then the slots of +y, +y, −y, −y. */
  quads: number[];
  /** (slot, element) pairs that receive +y, and those that receive −y. */
  plus: number[];
  minus: number[];
}

/**
 * All kernel-batched admittances of a plan: per frequency each kernel runs over its elements,
 * then every admittance is added into its slots (+y on the diagonal slots, −y off it). A class,
 * so that the sweep calls the same function for every plan (the JIT keeps it inlined).
 *
 * An admittance between two unknowns is added through its four slots in one step (one read of y
 * for four entries: measured about twice as fast as four (slot, admittance) pairs on a ladder);
 * the rest go through the pairs.
 */
export class AdmittanceBatch {
  private readonly y: Float64Array;
  /** The admittances at the second frequency of {@link stampTwo} (made on first use). */
  private yB: Float64Array | undefined;
  constructor(
    private readonly groups: KernelGroup[],
    /** 2·admittance index of each four-slot admittance. */
    private readonly quadY: Int32Array,
    /** Per four-slot admittance: 2·slot of its +y, +y, −y, −y entries. */
    private readonly quadSlots: Int32Array,
    /** (2·slot, 2·admittance index) pairs that receive +y, then those that receive −y. */
    private readonly plus: Int32Array,
    private readonly minus: Int32Array,
    total: number,
  ) {
    this.y = new Float64Array(2 * total);
  }

  /**
   * The same batch adding into another array: each slot's place 2·s becomes `target[s]` (e.g. a
   * sparse factor's `slotTarget`, so that the values go straight into its storage).
   */
  retargeted(target: Int32Array): AdmittanceBatch {
    const pairs = (list: Int32Array) => {
      const out = Int32Array.from(list);
      for (let t = 0; t < out.length; t += 2) out[t] = target[out[t]! >> 1]!;
      return out;
    };
    // (a plain loop: Int32Array.from with a mapping function was a measurable part of a sweep's set-up)
    const quads = new Int32Array(this.quadSlots.length);
    for (let t = 0; t < quads.length; t++) quads[t] = target[this.quadSlots[t]! >> 1]!;
    return new AdmittanceBatch(this.groups, this.quadY, quads, pairs(this.plus), pairs(this.minus), this.y.length / 2);
  }

  /**
   * Adds the admittances at angular frequency `w[0]` into the slot values `v`. (The frequency comes
   * in an array: a number passed to a call that is not inlined is boxed, an allocation a point.)
   */
  stamp(w: Float64Array, v: Float64Array): void {
    const y = this.y;
    const groups = this.groups;
    for (let g = 0; g < groups.length; g++) {
      const k = groups[g]!;
      k.kernel.run(w, 0, k.params, k.count, y, k.offset);
    }
    const qy = this.quadY;
    const qs = this.quadSlots;
    const nq = qy.length | 0;
    for (let e = 0; e < nq; e = (e + 1) | 0) {
      const a = qy[e]! | 0;
      const yr = y[a]!;
      const yi = y[a | 1]!;
      const q = e << 2;
      const s0 = qs[q]! | 0;
      const s1 = qs[q | 1]! | 0;
      const s2 = qs[q | 2]! | 0;
      const s3 = qs[q | 3]! | 0;
      v[s0] += yr;
      v[s0 | 1] += yi;
      v[s1] += yr;
      v[s1 | 1] += yi;
      v[s2] -= yr;
      v[s2 | 1] -= yi;
      v[s3] -= yr;
      v[s3 | 1] -= yi;
    }
    const pl = this.plus;
    const np = pl.length;
    for (let t = 0; t < np; t += 2) {
      const s = pl[t]!;
      const a = pl[t + 1]!;
      v[s] += y[a]!;
      v[s + 1] += y[a + 1]!;
    }
    const mi = this.minus;
    const nm = mi.length;
    for (let t = 0; t < nm; t += 2) {
      const s = mi[t]!;
      const a = mi[t + 1]!;
      v[s] -= y[a]!;
      v[s + 1] -= y[a + 1]!;
    }
  }

  /**
   * {@link stamp} without rounding the sums: each admittance goes through `add(hi, lo, place, value)`
   * (a double-double accumulation, see `solve/refine.ts`) into (hi, lo), per slot complex
   * interleaved. For the seldom-taken refinement of a point; the kernels run as in {@link stamp}.
   */
  stampParts(w: Float64Array, hi: Float64Array, lo: Float64Array, add: (hi: Float64Array, lo: Float64Array, k: number, y: number) => void): void {
    const y = this.y;
    const groups = this.groups;
    for (let g = 0; g < groups.length; g++) {
      const k = groups[g]!;
      k.kernel.run(w, 0, k.params, k.count, y, k.offset);
    }
    const qy = this.quadY;
    const qs = this.quadSlots;
    for (let e = 0; e < qy.length; e++) {
      const a = qy[e]!;
      const yr = y[a]!;
      const yi = y[a + 1]!;
      const q = 4 * e;
      add(hi, lo, qs[q]!, yr);
      add(hi, lo, qs[q]! + 1, yi);
      add(hi, lo, qs[q + 1]!, yr);
      add(hi, lo, qs[q + 1]! + 1, yi);
      add(hi, lo, qs[q + 2]!, -yr);
      add(hi, lo, qs[q + 2]! + 1, -yi);
      add(hi, lo, qs[q + 3]!, -yr);
      add(hi, lo, qs[q + 3]! + 1, -yi);
    }
    const pl = this.plus;
    for (let t = 0; t < pl.length; t += 2) {
      add(hi, lo, pl[t]!, y[pl[t + 1]!]!);
      add(hi, lo, pl[t]! + 1, y[pl[t + 1]! + 1]!);
    }
    const mi = this.minus;
    for (let t = 0; t < mi.length; t += 2) {
      add(hi, lo, mi[t]!, -y[mi[t + 1]!]!);
      add(hi, lo, mi[t]! + 1, -y[mi[t + 1]! + 1]!);
    }
  }

  /**
   * {@link stamp} at two frequencies at once, `w[0]` into `v` and `w[1]` into `u`: one pass over
   * the slot lists for both (each array gets exactly the additions {@link stamp} makes).
   */
  stampTwo(w: Float64Array, v: Float64Array, u: Float64Array): void {
    const y = this.y;
    const z = (this.yB ??= new Float64Array(y.length));
    const groups = this.groups;
    for (let g = 0; g < groups.length; g++) {
      const k = groups[g]!;
      k.kernel.run(w, 0, k.params, k.count, y, k.offset);
      k.kernel.run(w, 1, k.params, k.count, z, k.offset);
    }
    const qy = this.quadY;
    const qs = this.quadSlots;
    const nq = qy.length | 0;
    for (let e = 0; e < nq; e = (e + 1) | 0) {
      const a = qy[e]! | 0;
      const yr = y[a]!;
      const yi = y[a | 1]!;
      const zr = z[a]!;
      const zi = z[a | 1]!;
      const q = e << 2;
      const s0 = qs[q]! | 0;
      const s1 = qs[q | 1]! | 0;
      const s2 = qs[q | 2]! | 0;
      const s3 = qs[q | 3]! | 0;
      v[s0] += yr;
      v[s0 | 1] += yi;
      v[s1] += yr;
      v[s1 | 1] += yi;
      v[s2] -= yr;
      v[s2 | 1] -= yi;
      v[s3] -= yr;
      v[s3 | 1] -= yi;
      u[s0] += zr;
      u[s0 | 1] += zi;
      u[s1] += zr;
      u[s1 | 1] += zi;
      u[s2] -= zr;
      u[s2 | 1] -= zi;
      u[s3] -= zr;
      u[s3 | 1] -= zi;
    }
    const pl = this.plus;
    const np = pl.length;
    for (let t = 0; t < np; t += 2) {
      const s = pl[t]!;
      const a = pl[t + 1]!;
      v[s] += y[a]!;
      v[s + 1] += y[a + 1]!;
      u[s] += z[a]!;
      u[s + 1] += z[a + 1]!;
    }
    const mi = this.minus;
    const nm = mi.length;
    for (let t = 0; t < nm; t += 2) {
      const s = mi[t]!;
      const a = mi[t + 1]!;
      v[s] -= y[a]!;
      v[s + 1] -= y[a + 1]!;
      u[s] -= z[a]!;
      u[s + 1] -= z[a + 1]!;
    }
  }
}

/**
 * Gathers the kernel-batched admittances. Constant kernels are evaluated here, once, into `base`.
 * Undefined when nothing varies with frequency.
 */
function batchAdmittances(groups: Map<AdmittanceKernel, KernelSlots>): {
  batch: AdmittanceBatch | undefined;
  constants: ConstantGroup[];
  params: Map<AdmittanceKernel, Float64Array>;
} {
  const constants: ConstantGroup[] = [];
  const paramsOf = new Map<AdmittanceKernel, Float64Array>();
  const varying: KernelGroup[] = [];
  let nQuads = 0;
  let nPlus = 0;
  let nMinus = 0;
  for (const [kernel, g] of groups) {
    if (kernel.constant) continue;
    nQuads += g.quads.length / 5;
    nPlus += g.plus.length;
    nMinus += g.minus.length;
  }
  // slots as 2·slot and admittances as 2·index, the places of their real parts
  const quadY = new Int32Array(nQuads);
  const quadSlots = new Int32Array(4 * nQuads);
  const plus = new Int32Array(nPlus);
  const minus = new Int32Array(nMinus);
  let iq = 0;
  let ip = 0;
  let im = 0;
  let total = 0;
  for (const [kernel, g] of groups) {
    const count = g.params.length / kernel.stride;
    const params = Float64Array.from(g.params);
    paramsOf.set(kernel, params);
    if (kernel.constant) {
      constants.push({ kernel, params, count, quads: g.quads, plus: g.plus, minus: g.minus });
      continue;
    }
    varying.push({ kernel, params, count, offset: total });
    for (let t = 0; t < g.quads.length; t += 5) {
      quadY[iq] = 2 * (total + g.quads[t]!);
      for (let c = 0; c < 4; c++) quadSlots[4 * iq + c] = 2 * g.quads[t + 1 + c]!;
      iq++;
    }
    for (let t = 0; t < g.plus.length; t += 2) {
      plus[ip++] = 2 * g.plus[t]!;
      plus[ip++] = 2 * (total + g.plus[t + 1]!);
    }
    for (let t = 0; t < g.minus.length; t += 2) {
      minus[im++] = 2 * g.minus[t]!;
      minus[im++] = 2 * (total + g.minus[t + 1]!);
    }
    total += count;
  }
  const batch = varying.length === 0 ? undefined : new AdmittanceBatch(varying, quadY, quadSlots, plus, minus, total);
  return { batch, constants, params: paramsOf };
}

/** One element's contribution to the slot values, compiled on its own (see {@link captureElement}). */
export interface CapturedStamp {
  /** Its kernel-batched admittances: kernel, parameters, and the slots of +y, +y, −y, −y (−1: ground). */
  kernels: { kernel: AdmittanceKernel; params: Float64Array; slots: Int32Array }[];
  stampers: Stamper[];
}

/**
 * Element e of `circuit` (with whatever numbers it holds now) compiled onto the plan's slots and
 * branches but kept apart from the plan, so that its contribution alone can be stamped
 * ({@link addCaptured}): for derivatives of the matrix with respect to its numbers. The plan must
 * have been built with e in `replayable`. Throws {@link PatternChangedError} where the element's
 * numbers give another pattern.
 */
export function captureElement(plan: StampPlan, circuit: Circuit, e: number): CapturedStamp {
  const r = plan.replay;
  const el = circuit.elements[e]!;
  const rec = r?.records.get(e);
  if (!r || !rec) throw new PatternChangedError(el.name);
  const fail = () => new PatternChangedError(el.name);
  const out: CapturedStamp = { kernels: [], stampers: [] };
  const { builder } = replayBuilder(r, rec, 2 * Math.PI * plan.lowestFrequency, fail, (a, c, kernel, params) => {
    out.kernels.push({ kernel, params: Float64Array.from(params), slots: Int32Array.of(builder.entry(a, a), builder.entry(c, c), builder.entry(a, c), builder.entry(c, a)) });
  });
  const st = ELEMENTS.get(el.type)!.compile(mappedElement(el, plan.nodeUnknown), builder);
  if (st) out.stampers.push(st);
  return out;
}

/**
 * Adds a captured element's contribution at angular frequency `w[0]` into the slot values `v`
 * (complex interleaved); `y` is scratch of two numbers.
 */
export function addCaptured(c: CapturedStamp, w: Float64Array, y: Float64Array, v: Float64Array): void {
  for (const k of c.kernels) {
    k.kernel.run(k.kernel.constant ? ZERO : w, 0, k.params, 1, y, 0);
    const s = k.slots;
    for (let q = 0; q < 4; q++) {
      const slot = s[q]!;
      if (slot < 0) continue;
      const sign = q < 2 ? 1 : -1;
      v[2 * slot] += sign * y[0]!;
      v[2 * slot + 1] += sign * y[1]!;
    }
  }
  for (const st of c.stampers) st(w[0]!, v);
}
