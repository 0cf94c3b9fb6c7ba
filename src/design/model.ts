/**
 * A design model: a netlist with design variables, evaluated again and again at new variable
 * values — the engine behind `vary`, `fit`, `sensitivity` and the library's own loops.
 *
 * ```ts
 * const model = DesignModel.load('circuits/match-50-75-915.sbx');
 * model.setValues({ lser: 10e-9 });          // SI units; bounds checked
 * const specs = model.checkSpecs();          // solves only the frequencies the specs look at
 * const s = model.solve();                   // the whole sweep
 * ```
 *
 * @module
 */
import { readInputText } from '../io/source-file.js';
import { loadNetlist, type LoadOptions } from '../load.js';
import type { Circuit, Variable } from '../elaborate/circuit.js';
import type { NetworkData } from '../network/types.js';
import type { SpecResult } from '../check/types.js';
import type { Diagnostic } from '../diagnostics/diagnostic.js';
import { evaluateSpecs } from '../check/evaluate.js';
import { solveSweep, SweepRunner, type SolverChoice } from '../solve/sweep.js';
import { ElementValueError, ParameterGraph } from '../params/graph.js';
import { InputError } from '../diagnostics/diagnostic.js';
import { stampDifferences, sweepDerivatives } from './sensitivity.js';
import { parseFigure } from '../figures/registry.js';
import { entryFigureDerivative } from './figure-derivative.js';
import { buildPlan, PatternChangedError, restampElements, type StampPlan } from '../plan/plan.js';

export interface DesignOptions extends LoadOptions {
  /** The linear solver (default `auto`). */
  solver?: SolverChoice;
}

/** What makes a {@link DesignModel} again in another thread (plain data, structured-cloneable). */
export interface ModelRecipe {
  text: string;
  file: string;
  options: Omit<DesignOptions, 'readFile'>;
  /** The variable values, SI units, in netlist order. */
  values: Float64Array;
}

/** A variable value outside its range, or a name that is no variable. */
export class VariableError extends RangeError {
  constructor(
    message: string,
    readonly variable?: string,
  ) {
    super(message);
    this.name = 'VariableError';
  }
}

/** The text of a value in SI units for a `--set` option: `1.2e-11 F`. */
export function setText(v: Variable, value: number): string {
  return `${v.name}=${String(value)}${v.unit ? ` ${v.unit}` : ''}`;
}

export class DesignModel {
  /** The circuit as elaborated at the values given when the model was made. */
  readonly circuit: Circuit;
  /** The design variables, in netlist order. */
  readonly variables: readonly Variable[];
  /** Source texts by file name, for formatting diagnostics. */
  readonly sources: Map<string, string>;
  /** The warnings of loading the netlist (errors throw InputError instead). */
  readonly warnings: Diagnostic[];
  private readonly current: Float64Array;
  private readonly nominal: Float64Array;
  /** A yield sample's draws (per tolerance, x = n·mult + add), or none: every toleranced number nominal. */
  private draws: { mult: Float64Array; add: Float64Array } | undefined;
  /** The tolerances on element numbers: tolerance index, element, key, and the elaborated value. */
  private readonly elementTolerances: { t: number[]; element: Int32Array; key: string[]; elaborated: Float64Array };
  /**
   * The fast path (undefined where some number that depends on a variable cannot be followed
   * without elaborating again, Circuit.unfollowed): the parameter graph, the working circuit it
   * changes, the stamp plan and the sweeps set up on it.
   */
  private readonly fast: FastPath | undefined;

  private constructor(
    private readonly text: string,
    private readonly file: string,
    private readonly options: DesignOptions,
  ) {
    const { circuit, sources, warnings } = loadNetlist(text, file, options);
    this.warnings = warnings;
    this.circuit = circuit;
    this.variables = circuit.variables;
    this.sources = sources;
    this.nominal = Float64Array.from(circuit.variables, (v) => v.value);
    this.current = Float64Array.from(this.nominal);
    const onElements = circuit.tolerances.flatMap((tol, t) => (tol.target.kind === 'element' ? [{ t, element: tol.target.element, key: tol.target.key }] : []));
    this.elementTolerances = {
      t: onElements.map((o) => o.t),
      element: Int32Array.from(onElements, (o) => o.element),
      key: onElements.map((o) => o.key),
      elaborated: Float64Array.from(onElements, (o) => circuit.elements[o.element]!.props[o.key]!),
    };
    if (circuit.unfollowed.length === 0) {
      const graph = new ParameterGraph(circuit);
      const working = graph.workingCopy(circuit);
      const x = this.inputVector();
      this.fast = {
        graph,
        working,
        plan: buildPlan(working, { replayable: graph.elements }),
        applied: Float64Array.from(x),
        appliedElements: Float64Array.from(this.elementTolerances.elaborated),
        runners: new Map(),
        specPoints: specPoints(circuit),
      };
    }
  }

  /**
   * The values the compiled bindings read: the design variables, then the random inputs
   * (toleranced parameters that are not variables, Circuit.randomInputs), each toleranced one as
   * drawn (n·mult + add) when a sample is set.
   */
  private inputVector(): Float64Array {
    const c = this.circuit;
    const V = this.variables.length;
    const x = new Float64Array(V + c.randomInputs.length);
    x.set(this.current);
    for (const r of c.randomInputs) x[r.index] = r.value;
    const d = this.draws;
    if (d) {
      c.tolerances.forEach((tol, t) => {
        if (tol.target.kind === 'parameter') x[tol.target.input] = x[tol.target.input]! * d.mult[t]! + d.add[t]!;
      });
    }
    return x;
  }

  /** The values of the toleranced element numbers at inputs x: their own value (following x), drawn. */
  private elementValues(graph: ParameterGraph | undefined, x: Float64Array): Float64Array {
    const et = this.elementTolerances;
    const d = this.draws;
    const out = new Float64Array(et.t.length);
    for (let i = 0; i < out.length; i++) {
      const base = graph ? graph.valueOf(et.element[i]!, et.key[i]!, x, et.elaborated[i]!) : et.elaborated[i]!;
      out[i] = d ? base * d.mult[et.t[i]!]! + d.add[et.t[i]!]! : base;
    }
    return out;
  }

  /**
   * The nominal value of every tolerance (Circuit.tolerances, SI units) at the current variable
   * values: what a yield sample's draws spread (a drawn value is nominal·mult + add).
   */
  toleranceNominals(): Float64Array {
    const saved = this.draws;
    this.draws = undefined;
    try {
      const x = this.inputVector();
      const ev = this.elementValues(this.fast?.graph, x);
      const out = Float64Array.from(this.circuit.tolerances, (tol) => (tol.target.kind === 'parameter' ? x[tol.target.input]! : tol.nominal));
      this.elementTolerances.t.forEach((t, i) => {
        out[t] = ev[i]!;
      });
      return out;
    } finally {
      this.draws = saved;
    }
  }

  /**
   * Sets a yield sample's draws (src/yield/sampler.ts: per tolerance of Circuit.tolerances, the
   * value is n·mult + add with n its nominal value — for a design variable, its current value), or
   * none: every toleranced number at its nominal value, as the design tools see the circuit.
   * (Derivatives are taken at the nominal draws.)
   */
  setDraws(draws: { mult: Float64Array; add: Float64Array } | undefined): void {
    const n = this.circuit.tolerances.length;
    if (draws && (draws.mult.length !== n || draws.add.length !== n)) throw new RangeError(`draws for ${draws.mult.length} tolerances, but the netlist has ${n}`);
    this.draws = draws ? { mult: Float64Array.from(draws.mult), add: Float64Array.from(draws.add) } : undefined;
  }

  /**
   * Whether new values are taken by the fast path (re-stamping the plan) rather than by
   * elaborating the netlist again; false where a number that depends on a variable lies outside
   * the elements (a port reference, the sweep, a spec), see Circuit.unfollowed.
   */
  get followsVariables(): boolean {
    return this.fast !== undefined;
  }

  /** Brings the plan to the current values (only the elements that depend on changed variables). */
  private update(fast: FastPath): void {
    const x = this.inputVector();
    const ev = this.elementValues(fast.graph, x);
    if (sameValues(fast.applied, x) && sameValues(fast.appliedElements, ev)) return;
    let changed: number[];
    try {
      changed = fast.graph.apply(fast.working, x, fast.applied, this.circuit.frequencies);
      if (ev.length > 0) changed = [...new Set([...changed, ...fast.graph.setElementValues(fast.working, this.elementTolerances.element, this.elementTolerances.key, ev, this.circuit.frequencies)])];
    } catch (e) {
      // the working circuit holds some of the new numbers: every number is computed again next time
      fast.applied.fill(NaN);
      fast.appliedElements.fill(NaN);
      if (!(e instanceof ElementValueError)) throw e;
      const where = `with the design variables at ${this.setOptions().map((o) => o.replace('=', ' = ')).join(', ')}${this.draws ? ' and the parts as drawn' : ''}`;
      throw new InputError([{ severity: 'error', code: 'bad-value', message: e.message, span: e.span, help: where }], this.sources);
    }
    fast.applied.set(x);
    fast.appliedElements.set(ev);
    try {
      restampElements(fast.plan, fast.working, changed);
      for (const r of fast.runners.values()) r.refresh();
    } catch (e) {
      if (!(e instanceof PatternChangedError)) throw e;
      fast.plan = buildPlan(fast.working, { replayable: fast.graph.elements });
      fast.runners.clear();
    }
  }

  /** The sweep runner over `freqs` on the current plan (made once per frequency set and kept). */
  private runner(fast: FastPath, key: string, freqs: Float64Array): SweepRunner {
    let r = fast.runners.get(key);
    if (!r) {
      // one pivot reference for every frequency set (the sweep's first point), so that the spec
      // points give the values the whole sweep gives
      r = new SweepRunner(fast.working, { frequencies: freqs, plan: fast.plan, solver: this.options.solver, lowestFrequency: fast.plan.lowestFrequency, pivotFrequency: this.circuit.frequencies[0] });
      fast.runners.set(key, r);
    }
    return r;
  }

  /** Solves `freqs` at the current values on the fast path; the values are a fresh copy. */
  private solveFast(fast: FastPath, key: string, freqs: Float64Array): NetworkData {
    this.update(fast);
    const r = this.runner(fast, key, freqs);
    r.run(0, freqs.length);
    const net = r.finish();
    return { ...net, values: Float64Array.from(net.values) };
  }

  /**
   * What another thread needs to make the same model (its netlist text, file and options, and the
   * current variable values), or undefined where the options cannot be sent (a custom `readFile`).
   */
  get recipe(): ModelRecipe | undefined {
    if (this.options.readFile) return undefined;
    const { readFile: _r, ...options } = this.options;
    return { text: this.text, file: this.file, options, values: this.values };
  }

  /** A model made from a {@link recipe} (in another thread), at the recipe's variable values. */
  static fromRecipe(r: ModelRecipe): DesignModel {
    const m = new DesignModel(r.text, r.file, r.options);
    if (r.values.length > 0) m.setValues(r.values);
    return m;
  }

  /** A model of the netlist file at `path` (throws InputError as loadNetlistFile does). */
  static load(path: string, options: DesignOptions = {}): DesignModel {
    return new DesignModel(readInputText(path), path, options);
  }

  /** A model of a netlist text (`file` names it in messages and resolves its includes). */
  static fromText(text: string, file: string, options: DesignOptions = {}): DesignModel {
    return new DesignModel(text, file, options);
  }

  /** The current variable values, SI units, in the order of {@link variables} (a copy). */
  get values(): Float64Array {
    return Float64Array.from(this.current);
  }

  /** The values the model was made with (the netlist's, or its `--set` overrides). */
  get nominalValues(): Float64Array {
    return Float64Array.from(this.nominal);
  }

  /** The index of a variable by name, or -1. */
  indexOf(name: string): number {
    return this.variables.findIndex((v) => v.name === name);
  }

  /**
   * Sets variable values in SI units: a full vector (in the order of {@link variables}) or some
   * by name. A value outside its variable's range or not finite throws {@link VariableError}
   * and changes nothing.
   */
  setValues(values: ArrayLike<number> | Readonly<Record<string, number>>): void {
    const next = Float64Array.from(this.current);
    if (isArrayLike(values)) {
      if (values.length !== this.variables.length) throw new VariableError(`${values.length} values for ${this.variables.length} variables`);
      for (let i = 0; i < values.length; i++) next[i] = values[i]!;
    } else {
      for (const [name, value] of Object.entries(values)) {
        const i = this.indexOf(name);
        if (i < 0) throw new VariableError(`\`${name}\` is not a design variable${this.variables.length ? ` (the variables are ${this.variables.map((v) => v.name).join(', ')})` : ''}`, name);
        next[i] = value;
      }
    }
    this.variables.forEach((v, i) => {
      const x = next[i]!;
      if (!Number.isFinite(x) || x < v.lower || x > v.upper) {
        throw new VariableError(`${v.name} = ${x}${v.unit ? ` ${v.unit}` : ''} is outside its range ${v.lower} to ${v.upper}${v.unit ? ` ${v.unit}` : ''}`, v.name);
      }
    });
    this.current.set(next);
  }

  /** The current values as `--set` texts (`name=value unit`). */
  setOptions(values: ArrayLike<number> = this.current): string[] {
    return this.variables.map((v, i) => setText(v, values[i]!));
  }

  /**
   * The circuit at the current values: its elements, and its variables and their entries in
   * `parameters` (on the fast path, the parameters computed from the variables keep their
   * elaborated values in that list: the elements hold the numbers that count).
   */
  currentCircuit(): Circuit {
    const fast = this.fast;
    if (fast) {
      this.update(fast);
      const elements = fast.working.elements.map((el) => ({ ...el, props: { ...el.props }, at: { ...el.at } }));
      const at = new Map(this.variables.map((v, i) => [v.name, this.current[i]!]));
      const parameters = fast.working.parameters.map((p) => (at.has(p.name) ? { ...p, value: at.get(p.name)! } : p));
      return { ...fast.working, elements, parameters, variables: this.variables.map((v, i) => ({ ...v, value: this.current[i]! })) };
    }
    // elaborated again: the variables and the random inputs as --set options, then the parts drawn
    const x = this.inputVector();
    const named = [...this.variables.map((v, i) => ({ name: v.name, unit: v.unit, value: x[i]! })), ...this.circuit.randomInputs.map((r) => ({ name: r.name, unit: r.unit, value: x[r.index]! }))];
    const given = (s: string) => named.some((v) => s.trim().startsWith(`${v.name}=`) || s.trim().startsWith(`${v.name} `));
    const set = [...(this.options.set ?? []).filter((s) => !given(s)), ...named.map((v) => `${v.name}=${String(v.value)}${v.unit ? ` ${v.unit}` : ''}`)];
    const circuit = loadNetlist(this.text, this.file, { ...this.options, set }).circuit;
    const d = this.draws;
    const et = this.elementTolerances;
    if (d) {
      for (let i = 0; i < et.t.length; i++) {
        const el = circuit.elements[et.element[i]!]!;
        el.props[et.key[i]!] = el.props[et.key[i]!]! * d.mult[et.t[i]!]! + d.add[et.t[i]!]!;
      }
    }
    return circuit;
  }

  /** S over the sweep (or the given frequencies, Hz, ascending) at the current values. */
  solve(frequencies?: Float64Array): NetworkData {
    const fast = this.fast;
    if (!fast) return solveSweep(this.currentCircuit(), { frequencies, solver: this.options.solver });
    if (!frequencies || frequencies === this.circuit.frequencies) return this.solveFast(fast, 'sweep', this.circuit.frequencies);
    if (frequencies.length > 0 && frequencies[0]! < fast.plan.lowestFrequency) {
      // below the lowest frequency the plan was built for: a plan of their own
      this.update(fast);
      return solveSweep(fast.working, { frequencies, solver: this.options.solver });
    }
    const key = `list:${frequencies.join(',')}`;
    if (!fast.runners.has(key)) {
      // keep a few lists, not every one ever asked for
      const lists = [...fast.runners.keys()].filter((k) => k.startsWith('list:'));
      if (lists.length >= 4) fast.runners.delete(lists[0]!);
    }
    return this.solveFast(fast, key, frequencies);
  }

  /** The specs' results at the current values. */
  checkSpecs(): SpecResult[] {
    const fast = this.fast;
    if (fast) {
      const freqs = fast.specPoints;
      return evaluateSpecs(this.circuit.specs, freqs.length > 0 ? this.solveFast(fast, 'specs', freqs) : this.solveFast(fast, 'sweep', this.circuit.frequencies));
    }
    const c = this.currentCircuit();
    return evaluateSpecs(c.specs, solveSweep(c, { solver: this.options.solver }));
  }

  /** The specs' results and the derivatives of their worst margins (see {@link MarginGradient}). */
  marginGradient(): MarginGradient {
    const fast = this.fast;
    if (fast) {
      const key = fast.specPoints.length > 0 ? 'specs' : 'sweep';
      const freqs = fast.specPoints.length > 0 ? fast.specPoints : this.circuit.frequencies;
      const network = this.solveFast(fast, key, freqs);
      const results = evaluateSpecs(this.circuit.specs, network);
      // derivatives only where the margins are taken: each spec's worst point and its neighbours
      const need = new Uint8Array(freqs.length);
      for (const r of results) {
        const k = freqs.indexOf(r.worstFrequency);
        if (k < 0 || !Number.isFinite(r.worstMargin)) continue;
        if (needsWholeSweep(r.spec.figure)) need.fill(1);
        else for (let q = Math.max(0, k - 1); q <= Math.min(freqs.length - 1, k + 1); q++) need[q] = 1;
      }
      const points: number[] = [];
      need.forEach((n, k) => n && points.push(k));
      const derivatives = this.derivativesAt(fast, key, freqs, Int32Array.from(points), network.values.length);
      return marginDerivatives(this.circuit.specs, network, derivatives, this.variables, this.current, results);
    }
    return this.marginGradientByDifferences();
  }

  /** S and its exact derivatives on the fast path (see src/design/sensitivity.ts). */
  private derivativesFast(fast: FastPath, key: string, freqs: Float64Array): NetworkDerivatives {
    const network = this.solveFast(fast, key, freqs);
    return { network, derivatives: this.derivativesAt(fast, key, freqs, undefined, network.values.length) };
  }

  /** dS/dθ at some points of `freqs` (all without `points`; zero elsewhere), the plan at the current values. */
  private derivativesAt(fast: FastPath, key: string, freqs: Float64Array, points: Int32Array | undefined, length: number): Float64Array[] {
    this.update(fast);
    const runner = this.runner(fast, key, freqs);
    const diffs = stampDifferences(fast.plan, fast.working, fast.graph, this.variables, this.current, (fast.scratch ??= fast.graph.workingCopy(fast.working)));
    const derivatives = this.variables.map(() => new Float64Array(length));
    sweepDerivatives(runner, diffs, derivatives, points);
    return derivatives;
  }

  /** {@link marginGradient} by central differences of whole evaluations (where the fast path is not taken). */
  private marginGradientByDifferences(): MarginGradient {
    const base = Float64Array.from(this.current);
    const results = this.checkSpecs();
    const nv = this.variables.length;
    const gradient = new Float64Array(results.length * nv);
    for (let v = 0; v < nv; v++) {
      const [lo, hi, h] = this.steps(v, base);
      this.current.set(base);
      this.current[v] = hi;
      const up = this.checkSpecs();
      this.current[v] = lo;
      const down = this.checkSpecs();
      for (let s = 0; s < results.length; s++) gradient[s * nv + v] = (up[s]!.worstMargin - down[s]!.worstMargin) / h;
    }
    this.current.set(base);
    return { results, gradient };
  }

  /**
   * S over the sweep (or the given frequencies) and its derivatives (see {@link NetworkDerivatives}):
   * exact on the fast path (the direct method on each point's factorisation, src/design/sensitivity.ts),
   * else central differences of whole solves.
   */
  derivatives(frequencies?: Float64Array): NetworkDerivatives {
    const fast = this.fast;
    if (fast && (!frequencies || frequencies === this.circuit.frequencies)) return this.derivativesFast(fast, 'sweep', this.circuit.frequencies);
    if (fast && frequencies!.length > 0 && frequencies![0]! >= fast.plan.lowestFrequency) {
      this.solve(frequencies);
      return this.derivativesFast(fast, `list:${frequencies!.join(',')}`, frequencies!);
    }
    const base = Float64Array.from(this.current);
    const network = this.solve(frequencies);
    const derivatives = this.variables.map((_, v) => {
      const [lo, hi, h] = this.steps(v, base);
      this.current.set(base);
      this.current[v] = hi;
      const up = this.solve(frequencies).values;
      this.current[v] = lo;
      const down = this.solve(frequencies).values;
      return up.map((u, k) => (u - down[k]!) / h);
    });
    this.current.set(base);
    return { network, derivatives };
  }

  /**
   * A figure as specs name it (`il(2,1)`, `rl(1)`, `gd(S21)`…) over the sweep (or the given
   * frequencies) at the current values, and its derivative with respect to each variable (per SI
   * unit of the variable), from {@link derivatives}.
   */
  figureDerivatives(figure: string, frequencies?: Float64Array): { frequencies: Float64Array; values: Float64Array; derivatives: Float64Array[] } {
    const { network, derivatives } = this.derivatives(frequencies);
    const { values, d } = figureAlong(figure, network, derivatives, this.variables, this.current);
    return { frequencies: network.frequencies, values, derivatives: d };
  }

  /** A central-difference step for variable v, kept inside its range: [low, high, high − low]. */
  private steps(v: number, base: Float64Array): [number, number, number] {
    const x = base[v]!;
    const { lower, upper } = this.variables[v]!;
    const d = 1e-6 * Math.max(Math.abs(x), (upper - lower) * 1e-3);
    const hi = Math.min(upper, x + d);
    const lo = Math.max(lower, x - d);
    return [lo, hi, hi - lo];
  }
}

/** Spec results with the derivative of each spec's worst margin with respect to each variable. */
export interface MarginGradient {
  results: SpecResult[];
  /** d(worst margin of spec s)/d(variable v) at gradient[s·variables + v], per SI unit of the variable. */
  gradient: Float64Array;
}

/** S over a sweep with its derivatives with respect to each variable. */
export interface NetworkDerivatives {
  network: NetworkData;
  /** Per variable: dS/dx in the layout of `network.values` (complex interleaved), per SI unit of x. */
  derivatives: Float64Array[];
}

/** The offsets and weights of a fourth-order central difference, in steps of τ. */
const FIG_OFFSETS = [-2, -1, 1, 2] as const;
const FIG_WEIGHTS = [1 / 12, -8 / 12, 8 / 12, -1 / 12] as const;

/**
 * The derivatives of the specs' worst margins from S and dS/dθ: each figure's derivative along
 * dS/dθ at its worst point, taken as a fourth-order central difference of the figure in S
 * (F(S + τ·dS) at τ = ±1, ±2 steps of 10⁻⁴ of the variable's value: the figures are smooth
 * functions of S, so the error is about 1e-12 relative). Where the worst point is shared or
 * switches, this is the derivative of the margin at the worst point (a one-sided choice, as for
 * any minimum).
 */
export function marginDerivatives(specs: Circuit['specs'], network: NetworkData, derivatives: Float64Array[], variables: readonly Variable[], x: ArrayLike<number>, results = evaluateSpecs(specs, network)): MarginGradient {
  const nv = variables.length;
  const gradient = new Float64Array(results.length * nv);
  const done = new Map<string, Float64Array>();
  results.forEach((r, s) => {
    const k = network.frequencies.indexOf(r.worstFrequency);
    if (k < 0 || !Number.isFinite(r.worstMargin)) return;
    const key = `${r.spec.figure}@${k}`;
    let d = done.get(key);
    if (!d) {
      // the figure on the worst point and its neighbours (a group delay takes both), or on
      // every point where it needs them all (the unwrapped phase)
      const parsed = parseFigure(r.spec.figure, { ports: network.ports });
      const exact = derivatives.map((dS) => entryFigureDerivative(parsed, network, dS, k));
      if (exact.every((e) => e !== undefined)) d = Float64Array.from(exact as number[]);
      else {
        const [a, b] = needsWholeSweep(r.spec.figure) ? [0, network.frequencies.length - 1] : [Math.max(0, k - 1), Math.min(network.frequencies.length - 1, k + 1)];
        const w = pointsOf(network, derivatives, a, b);
        const along = figureAlong(r.spec.figure, w.network, w.derivatives, variables, x);
        d = Float64Array.from(along.d, (dv) => dv[k - a]!);
      }
      done.set(key, d);
    }
    for (let v = 0; v < nv; v++) gradient[s * nv + v] = (r.spec.bound === 'max' ? -1 : 1) * d[v]!;
  });
  return { results, gradient };
}

/** Whether a figure at one point depends on every point before it (the unwrapped phase). */
function needsWholeSweep(figure: string): boolean {
  return /^\s*uphase\b/i.test(figure);
}

/** Points a…b (inclusive) of a network and of its derivatives. */
function pointsOf(net: NetworkData, derivatives: Float64Array[], a: number, b: number): { network: NetworkData; derivatives: Float64Array[] } {
  if (a === 0 && b === net.frequencies.length - 1) return { network: net, derivatives };
  const per = 2 * net.ports * net.ports;
  return {
    network: { ...net, frequencies: net.frequencies.subarray(a, b + 1), values: net.values.subarray(a * per, (b + 1) * per) },
    derivatives: derivatives.map((d) => d.subarray(a * per, (b + 1) * per)),
  };
}

/**
 * A figure over the network's points and its derivative along each variable's dS/dθ (a
 * fourth-order central difference of the figure in S; see {@link marginDerivatives}).
 */
export function figureAlong(figure: string, network: NetworkData, derivatives: Float64Array[], variables: readonly Variable[], x: ArrayLike<number>): { values: Float64Array; d: Float64Array[] } {
  const fig = parseFigure(figure, { ports: network.ports });
  const values = fig.evaluate(network);
  const moved = new Float64Array(network.values.length);
  const movedNet: NetworkData = { ...network, values: moved };
  const d = variables.map((v, i) => {
    const dS = derivatives[i]!;
    const acc = new Float64Array(values.length);
    // the closed forms of entry figures where they apply (exact), else the difference below
    let exact = true;
    for (let k = 0; k < acc.length && exact; k++) {
      const e = entryFigureDerivative(fig, network, dS, k);
      if (e === undefined) exact = false;
      else acc[k] = e;
    }
    if (exact) return acc;
    acc.fill(0);
    const tau = 1e-4 * Math.max(Math.abs(x[i]!), 1e-3 * (v.upper - v.lower));
    FIG_OFFSETS.forEach((t, q) => {
      for (let k = 0; k < moved.length; k++) moved[k] = network.values[k]! + t * tau * dS[k]!;
      const f = fig.evaluate(movedNet);
      for (let k = 0; k < acc.length; k++) acc[k] += (FIG_WEIGHTS[q]! / tau) * f[k]!;
    });
    return acc;
  });
  return { values, d };
}

interface FastPath {
  graph: ParameterGraph;
  working: Circuit;
  plan: StampPlan;
  /** The input values (variables, then random inputs) the plan holds. */
  applied: Float64Array;
  /** The values of the toleranced element numbers the plan holds. */
  appliedElements: Float64Array;
  /** Sweeps set up on the plan, by frequency set ('sweep', 'specs', or a list). */
  runners: Map<string, SweepRunner>;
  /** The sweep points the specs look at (empty: the whole sweep is needed). */
  specPoints: Float64Array;
  /** A second working copy, moved about by the derivatives (made on first use). */
  scratch?: Circuit;
}

function sameValues(a: Float64Array, b: Float64Array): boolean {
  for (let i = 0; i < a.length; i++) if (!Object.is(a[i], b[i])) return false;
  return true;
}

/**
 * The sweep points the specs look at: those inside a spec's band (with the tolerance of
 * evaluateSpecs), and their neighbours, since a group delay takes the phase of the points on
 * either side. Empty (the whole sweep) when a spec's figure needs every point before it (the
 * unwrapped phase) or when nothing is saved.
 */
export function specPoints(circuit: Circuit): Float64Array {
  const f = circuit.frequencies;
  if (circuit.specs.length === 0 || circuit.specs.some((s) => /^\s*uphase\b/i.test(s.figure))) return new Float64Array(0);
  const keep = new Uint8Array(f.length);
  for (const spec of circuit.specs) {
    const [lo, hi] = spec.band;
    for (let k = 0; k < f.length; k++) {
      if (f[k]! < lo * (1 - 1e-12) || f[k]! > hi * (1 + 1e-12)) continue;
      keep[k] = 1;
      if (k > 0) keep[k - 1] ||= 2;
      if (k + 1 < f.length) keep[k + 1] ||= 2;
    }
  }
  const out: number[] = [];
  for (let k = 0; k < f.length; k++) if (keep[k]) out.push(f[k]!);
  return out.length < f.length ? Float64Array.from(out) : new Float64Array(0);
}

function isArrayLike(x: unknown): x is ArrayLike<number> {
  return ArrayBuffer.isView(x) || Array.isArray(x);
}
