/**
 * The compiled parameter graph: the stage between elaboration and the stamp plan that turns new
 * design-variable values into new element numbers.
 *
 * Elaboration hands over, for every element number that depends on a variable, a compiled
 * function of the variables (Circuit.bindings, src/params/compile.ts); parameters in between are
 * inlined into those functions. Given new values, the graph recomputes only the numbers that
 * depend on a variable that changed, checks them as elaboration would (signs, the element's own
 * rules, its model over the sweep), and says which elements changed — which the stamp plan then
 * re-stamps on its fixed pattern (src/plan/plan.ts restampElements).
 *
 * @module
 */
import type { Circuit, ValueBinding } from '../elaborate/circuit.js';
import { ELEMENTS } from '../elements/registry.js';
import type { ElementInstance } from '../elements/types.js';
import { signOk } from '../elaborate/values.js';
import type { SourceSpan } from '../diagnostics/diagnostic.js';

/** New variable values give an element a number it cannot take (a negative capacitance, say). */
export class ElementValueError extends RangeError {
  constructor(
    message: string,
    readonly element: string,
    readonly span: SourceSpan,
  ) {
    super(message);
    this.name = 'ElementValueError';
  }
}

export class ParameterGraph {
  /** Per variable: the bindings that depend on it. */
  private readonly byVariable: number[][];
  private readonly bindings: readonly ValueBinding[];
  /** The elements whose numbers follow the variables (indices into Circuit.elements). */
  readonly elements: ReadonlySet<number>;
  /** Scratch: which bindings and elements a call touches (reset after each). */
  private readonly mark: Uint8Array;
  private readonly elementMark = new Set<number>();

  constructor(circuit: Circuit) {
    this.bindings = circuit.bindings;
    // the design variables, then the random inputs (toleranced parameters) the bindings may read
    this.byVariable = Array.from({ length: circuit.variables.length + circuit.randomInputs.length }, () => []);
    circuit.bindings.forEach((b, i) => {
      for (const v of b.value.deps) this.byVariable[v]!.push(i);
    });
    // the elements that follow inputs, and those whose own numbers carry a tolerance (a yield
    // run sets them directly: setElementValues)
    this.elements = new Set([...circuit.bindings.map((b) => b.element), ...circuit.tolerances.flatMap((t) => (t.target.kind === 'element' ? [t.target.element] : []))]);
    this.mark = new Uint8Array(circuit.bindings.length);
  }

  /**
   * The value number `key` of element e takes at inputs x: its compiled binding's, or, for a
   * number that follows no input, `elaborated` (the value elaboration gave it).
   */
  valueOf(e: number, key: string, x: Float64Array, elaborated: number): number {
    const b = this.bindings.find((q) => q.element === e && q.key === key && q.target === 'prop');
    return b ? b.value.fn(x) : elaborated;
  }

  /**
   * Sets element numbers directly (a drawn part value): each `values[i]` into number `keys[i]` of
   * element `elements[i]` of `circuit` (a {@link workingCopy}), where it differs; checks the
   * changed elements as {@link apply} does and returns their indices (ascending).
   */
  setElementValues(circuit: Circuit, elements: ArrayLike<number>, keys: readonly string[], values: ArrayLike<number>, frequencies: Float64Array | undefined): number[] {
    const changed = this.elementMark;
    changed.clear();
    for (let i = 0; i < keys.length; i++) {
      const el = circuit.elements[elements[i]!]!;
      if (Object.is(el.props[keys[i]!], values[i])) continue;
      el.props[keys[i]!] = values[i]!;
      changed.add(elements[i]!);
    }
    const out = [...changed].sort((a, b) => a - b);
    if (frequencies) for (const e of out) checkElement(circuit.elements[e]!, frequencies, (key) => this.spanOf(e, key));
    return out;
  }

  /**
   * A copy of the circuit whose followed elements have numbers of their own (their `props` and
   * `at` objects copied), for {@link apply} to change while the original stays as elaborated.
   */
  workingCopy(circuit: Circuit): Circuit {
    const elements = circuit.elements.slice();
    for (const e of this.elements) {
      const el = elements[e]!;
      elements[e] = { ...el, props: { ...el.props }, at: { ...el.at } };
    }
    return { ...circuit, elements };
  }

  /**
   * Sets the numbers that depend on variables whose value differs between `x` and `previous`
   * (all of them without `previous`) in `circuit` (a {@link workingCopy}); returns the indices of
   * the elements that changed. Checks each changed element over `frequencies` and throws
   * {@link ElementValueError} for a number it cannot take — after which the circuit holds the new
   * numbers up to that element: give it values that work before solving.
   */
  apply(circuit: Circuit, x: Float64Array, previous: Float64Array | undefined, frequencies: Float64Array | undefined): number[] {
    const mark = this.mark;
    const touched: number[] = [];
    for (let v = 0; v < this.byVariable.length; v++) {
      if (previous && Object.is(previous[v], x[v])) continue;
      for (const b of this.byVariable[v]!) {
        if (mark[b]) continue;
        mark[b] = 1;
        touched.push(b);
      }
    }
    const changed = this.elementMark;
    changed.clear();
    for (const b of touched) {
      mark[b] = 0;
      const binding = this.bindings[b]!;
      const el = circuit.elements[binding.element]!;
      const value = binding.value.fn(x);
      if (binding.target === 'prop') el.props[binding.key] = value;
      else el.at[binding.key] = value;
      changed.add(binding.element);
    }
    const out = [...changed].sort((a, b) => a - b);
    if (frequencies) for (const e of out) checkElement(circuit.elements[e]!, frequencies, (key) => this.spanOf(e, key));
    return out;
  }

  /** Where the number `key` of element e comes from: its expression, when it follows the variables. */
  private spanOf(e: number, key: string | undefined): SourceSpan | undefined {
    if (key === undefined) return undefined;
    return this.bindings.find((b) => b.element === e && b.key === key)?.span;
  }

  /** The elements whose numbers depend on variable v (ascending indices into Circuit.elements). */
  elementsOf(v: number): number[] {
    return [...new Set(this.byVariable[v]!.map((b) => this.bindings[b]!.element))].sort((a, b) => a - b);
  }
}

const SIGN_WORDS = { positive: 'above zero', nonnegative: 'zero or more', nonzero: 'other than zero' } as const;

/**
 * The checks elaboration makes of an element's numbers, for numbers that followed new variable
 * values, with elaboration's messages, located at the expression the number comes from (else at
 * the element).
 */
function checkElement(el: ElementInstance, frequencies: Float64Array, spanOf: (key: string | undefined) => SourceSpan | undefined): void {
  const type = ELEMENTS.get(el.type)!;
  const fail = (message: string, key?: string) => {
    throw new ElementValueError(message, el.name, spanOf(key) ?? el.span);
  };
  for (const p of type.properties) {
    const v = el.props[p.key];
    if (v === undefined) continue;
    if (!Number.isFinite(v)) fail(`\`${p.key}\` is not finite`, p.key);
    if (!signOk(p, v)) fail(`\`${p.key}\` must be ${SIGN_WORDS[p.sign!]}`, p.key);
    const at = el.at[p.key];
    if (at !== undefined && !(Number.isFinite(at) && at >= 0)) fail('the frequency after `at` must be a finite frequency of 0 Hz or more', p.key);
  }
  type.validate?.(el, (message, key) => fail(message, key));
  if (frequencies.length > 0) type.checkSweep?.(el, frequencies, (message) => fail(`\`${el.name}\`: ${message}`));
}
