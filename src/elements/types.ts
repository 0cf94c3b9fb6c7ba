import type { SourceSpan } from '../diagnostics/diagnostic.js';

/** Ground: the reserved node name and its index. */
export const GROUND_NAME = 'ground';
export const GROUND = -1;

/** A named terminal of an element, given in the netlist as `key=node`. */
export interface TerminalSpec {
  key: string;
  doc: string;
  /** Node used when the terminal is not given; absent means the terminal is required. */
  defaultNode?: string;
}

/** A numeric property of an element, given as `key=expression [at frequency]`. */
export interface PropertySpec {
  key: string;
  /** SI unit the value must have the dimension of (`F`, `H`, `ohm`, `S`, `Hz`…); null for a pure number. */
  unit: string | null;
  /** What the quantity is called, for messages ("capacitance"). */
  quantity: string;
  required?: boolean;
  /** Value used when the property is not given. */
  defaultValue?: number;
  /** Whether the property takes `at <frequency>` (and then requires it). */
  takesAt?: boolean;
  /** Sign rule checked at elaboration. */
  sign?: 'positive' | 'nonnegative' | 'nonzero';
  doc: string;
}

/** A property given as text: a quoted string (`file="saw.s2p"`) or, for a choice, a bare word (`interp=polar`). */
export interface TextPropertySpec {
  key: string;
  doc: string;
  required?: boolean;
  /** The allowed words, when the property is a choice. */
  choices?: readonly string[];
  /** Value used when the property is not given. */
  defaultValue?: string;
}

/** What an element with terminals that depend on its data can ask for while it is elaborated. */
export interface ResolveContext {
  /** Reads network data from a file (path relative to the netlist the statement is in). */
  readNetwork(path: string): import('../network/types.js').NetworkData;
  /** Reports an error at the statement (or at the given key). */
  fail(message: string, key?: string, help?: string): void;
}

/** An element after elaboration: plain numbers in SI units, nodes as indices. */
export interface ElementInstance {
  type: string;
  name: string;
  /** Node index per terminal, in the order of the type's `terminals`; GROUND (-1) for ground. */
  nodes: number[];
  /** Node names per terminal, for messages. */
  nodeNames: string[];
  /** Property values in SI units (only those given or defaulted). */
  props: Record<string, number>;
  /** For properties given with `at f`: that frequency in Hz. */
  at: Record<string, number>;
  span: SourceSpan;
  /** Text properties (see {@link TextPropertySpec}). */
  text: Record<string, string>;
  /** Whatever the type's `resolve` prepared (a data element's network data, say). */
  data?: unknown;
}

/**
 * What an element can ask of the stamp plan while it is compiled: unknown indices and matrix
 * slots. Slots are fixed once per circuit; the per-frequency stampers only add numbers into them.
 */
export interface StampBuilder {
  /** A fresh unknown (an extra row and column), e.g. a branch current. */
  branch(label: string): number;
  /** The slot of matrix entry (row, col); -1 when either is ground. */
  entry(row: number, col: number): number;
  /**
   * The lowest angular frequency (rad/s) the plan will be solved at. An element may choose its
   * formulation by it: an inductor, say, needs a branch current only where its impedance can
   * come close to zero.
   */
  readonly lowestOmega: number;
  /**
   * Stamps a two-terminal admittance between unknowns a and b whose value a kernel computes; the
   * plan runs each kernel once per frequency for all the elements that use it (one tight loop per
   * element type instead of one call per element). `params` are this element's numbers, as many
   * as the kernel's stride.
   */
  admittance(a: number, b: number, kernel: AdmittanceKernel, params: readonly number[]): void;
}

/**
 * The admittance of one kind of two-terminal element, computed for many elements at once.
 * Element k's parameters are params[k·stride … k·stride + stride − 1]; its admittance goes to
 * out[2(offset + k)] (real) and out[2(offset + k) + 1] (imaginary). Must not allocate. The angular
 * frequency is `w[at]`: an array and an index rather than a number, because a number passed to a
 * call that is not inlined is boxed (an allocation per point and kernel).
 */
export interface AdmittanceKernel {
  readonly stride: number;
  /** True when the admittance does not depend on frequency: the plan then evaluates it once. */
  readonly constant?: boolean;
  run(w: Float64Array, at: number, params: Float64Array, count: number, out: Float64Array, offset: number): void;
}

/**
 * Adds this element's contribution at angular frequency `omega` into the slot values `v`
 * (complex interleaved: slot s has its real part at 2s and imaginary part at 2s+1).
 * Must not allocate.
 */
export type Stamper = (omega: number, v: Float64Array) => void;

/** Everything one element type is: its netlist schema, its documentation and its stamp. */
export interface ElementType {
  keyword: string;
  /** One line for the grammar reference and `--help`. */
  summary: string;
  /** A netlist line using the element. */
  example: string;
  terminals: readonly TerminalSpec[];
  properties: readonly PropertySpec[];
  textProperties?: readonly TextPropertySpec[];
  /**
   * For elements whose terminals depend on their text properties (a data file's port count):
   * called after the text properties are read and before the terminals; returns the terminals
   * (replacing `terminals`) and may store prepared data in `el.data`. Undefined means it failed
   * (and has reported why through `ctx.fail`).
   */
  resolve?(el: ElementInstance, ctx: ResolveContext): TerminalSpec[] | undefined;
  /** Warnings about the element for a sweep up to `maxFrequency` (Hz): models used outside their ranges, say. */
  warnings?(el: ElementInstance, maxFrequency: number): string[];
  /**
   * Errors of the element over the sweep (ascending frequencies, Hz): a model that cannot be
   * evaluated at some of them, say. Called once the sweep is known; `fail` reports at the
   * statement (or at the given key).
   */
  checkSweep?(el: ElementInstance, frequencies: Float64Array, fail: (message: string, key?: string, help?: string) => void): void;
  /** The frequency range (Hz) the element is defined over, if limited (measured data). */
  frequencyRange?(el: ElementInstance): [number, number] | undefined;
  /** Cross-property rules (e.g. two loss forms given at once); report problems through `fail`. */
  validate?(el: ElementInstance, fail: (message: string, key?: string, help?: string) => void): void;
  /**
   * Which of its terminals the element joins, as groups of indices into its terminals — used to
   * find node groups with no path to ground (a transformer joins p1–p2 and s1–s2 but not one
   * winding to the other). Absent means every terminal is joined to every other.
   */
  connections?: readonly (readonly number[])[];
  /**
   * Whether the element conducts nothing between its terminals at angular frequency `omega`
   * (a capacitor at 0 Hz). Used only to explain a singular system; absent means "never open".
   */
  openAt?(el: ElementInstance, omega: number): boolean;
  /**
   * Compiles the element into a stamper over fixed slots, or into stamps given to the builder
   * (`b.admittance`), in which case it returns undefined.
   */
  compile(el: ElementInstance, b: StampBuilder): Stamper | undefined;
}
