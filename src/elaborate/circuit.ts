import type { Diagnostic, SourceSpan } from '../diagnostics/diagnostic.js';
import type { ElementInstance } from '../elements/types.js';
import type { SpecDefinition } from '../check/types.js';
import type { Compiled } from '../params/compile.js';

/** A port after elaboration: numbered from 1, between two nodes, with a real reference impedance. */
export interface Port {
  /** 1-based port number. */
  number: number;
  plus: number;
  minus: number;
  plusName: string;
  minusName: string;
  /** Reference impedance in ohms: its resistance (> 0)… */
  reference: number;
  /** …and its reactance, for a complex reference (power waves, Kurokawa 1965); 0 or absent for a real one. */
  reactance?: number;
  span: SourceSpan;
}

/** A parameter's final value, for summaries and reports. */
export interface ParameterValue {
  name: string;
  /** Value in SI units (or the plain number). */
  value: number;
  /** The SI unit text of `value` ('' for a plain number), e.g. 'ohm', 'F', 'Hz'. */
  unit: string;
  span: SourceSpan;
}

/**
 * A design variable: a `let` parameter with a range (`let c = 3.3 pF vary 1 pF to 10 pF series E24`).
 * Numbers in SI units.
 */
export interface Variable {
  name: string;
  /** The value used (the netlist's, or a `--set` override), in SI units. */
  value: number;
  lower: number;
  upper: number;
  /** The SI unit text ('F', 'H', 'ohm'…), or null for a plain number. */
  unit: string | null;
  /** A preferred-number series (IEC 60063) the value is to be taken from. */
  series?: 'E6' | 'E12' | 'E24' | 'E48' | 'E96' | 'E192';
  /** A step the value is to be a multiple of (counted from `lower`), in SI units. */
  step?: number;
  /** The parameter's name in the `let` line. */
  span: SourceSpan;
}

/**
 * A number of an element that depends on design variables: property `key` (or the frequency
 * after its `at`) of element `element` (an index into Circuit.elements) as a compiled function
 * of the variables' SI values (src/params/compile.ts).
 */
export interface ValueBinding {
  element: number;
  target: 'prop' | 'at';
  key: string;
  value: Compiled;
  /** The expression, for messages. */
  span: SourceSpan;
}

/**
 * A number outside the elements that depends on a design variable (a port reference, a sweep
 * or spec value), or an expression whose plain numbers cannot follow the variables: a new
 * variable value then needs the netlist elaborated again.
 */
export interface Unfollowed {
  what: string;
  span: SourceSpan;
  reason: string;
}

/**
 * How a toleranced number spreads around its nominal value, in SI units of the value. Uniform:
 * within ±`relative`·nominal or ±`absolute`. Normal: standard deviation `relativeSigma`·nominal
 * or `sigma`, truncated at ±`cut` standard deviations when given. Exactly one of each pair is set.
 */
export type ToleranceDistribution =
  | { kind: 'uniform'; relative?: number; absolute?: number }
  | { kind: 'normal'; relativeSigma?: number; sigma?: number; cut?: number };

/**
 * A tolerance (`tol …`) as written in the netlist, for a later stage to draw from.
 * - on a `let` parameter: `input` is its index in the value vector the compiled bindings read —
 *   a design variable's own index (`variable` is then set too), or a random input's (see
 *   {@link RandomInput});
 * - on an element's number: the element (an index into Circuit.elements) and the property key,
 *   whose number the drawn value replaces (`nominal` being what elaboration gave it).
 */
export interface Tolerance {
  target: { kind: 'parameter'; name: string; input: number; variable?: number } | { kind: 'element'; element: number; key: string };
  distribution: ToleranceDistribution;
  /** The lot the part comes from: its draw is shared with the lot's other parts (see {@link Lot}). */
  lot?: string;
  /** The value the tolerance spreads around, in SI units. */
  nominal: number;
  /** The SI unit of the value ('F', 'H', 'ohm'…), or null for a plain number. */
  unit: string | null;
  /** The `tol …` clause. */
  span: SourceSpan;
}

/**
 * The `yield` statement: the yield the design must reach (a fraction, 0 to 1) and the run that
 * shows it (samples and seed), as `scatterbox yield` takes them unless its options say otherwise.
 */
export interface YieldPlan {
  min?: number;
  samples?: number;
  seed?: number;
  span: SourceSpan;
}

/**
 * A lot (`lot caps tol normal 3%`): its parts share one draw of this relative spread, each part's
 * own tolerance added on top.
 */
export interface Lot {
  name: string;
  distribution: ToleranceDistribution;
  span: SourceSpan;
}

/**
 * A toleranced `let` parameter that is not a design variable: a node of the compiled parameter
 * graph like a variable, at index `index` (after the V design variables: V, V+1, …) of the value
 * vector the bindings read. A vector of the V variable values alone leaves it at its nominal
 * value, so the design tools see the circuit as before.
 */
export interface RandomInput {
  name: string;
  /** The nominal value, in SI units. */
  value: number;
  unit: string | null;
  index: number;
  /** The `tol` word. */
  span: SourceSpan;
}

/** The elaborated circuit: plain numbers in SI units, nodes as indices (ground = -1). */
export interface Circuit {
  file: string;
  title?: string;
  /** Node names by index (ground excluded). */
  nodeNames: string[];
  elements: ElementInstance[];
  /** Ports sorted by number, numbered 1..N without gaps. */
  ports: Port[];
  /** Limits the circuit must meet (`spec` statements), checked by `scatterbox check`. */
  specs: SpecDefinition[];
  /** Nodes that serve as the reference of a group with ports but no path to ground. */
  localReferences: number[];
  /** Sweep frequencies in Hz, ascending, without duplicates. */
  frequencies: Float64Array;
  parameters: ParameterValue[];
  /** The design variables (`let … vary …`), in netlist order. */
  variables: Variable[];
  /** The element numbers that follow the variables (empty without variables). */
  bindings: ValueBinding[];
  /** Numbers that depend on variables but that re-evaluation cannot follow (see {@link Unfollowed}). */
  unfollowed: Unfollowed[];
  /** The tolerances (`tol …`), in netlist order (empty without). */
  tolerances: Tolerance[];
  /** The lots parts are drawn from (`lot NAME tol …`). */
  lots: Lot[];
  /** The yield target and run of the `yield` statement, if the netlist has one. */
  yieldPlan?: YieldPlan;
  /**
   * The toleranced parameters that are not design variables, in netlist order: the bindings may
   * depend on them (indices from `variables.length` up).
   */
  randomInputs: RandomInput[];
  /** Like `unfollowed`, for numbers that depend on random inputs only (no design variable). */
  randomUnfollowed: Unfollowed[];
  /** Warnings found while elaborating (errors throw instead). */
  warnings: Diagnostic[];
}
