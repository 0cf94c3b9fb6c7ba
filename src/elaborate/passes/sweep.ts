/**
 * The sweep pass: the frequencies from the `sweep` statements (or the ones given in their place,
 * `--sweep`), built by src/elaborate/sweep.ts; then the elements checked over them: data that
 * does not cover the sweep, models that cannot be evaluated somewhere in it, and the elements'
 * own warnings (models outside their ranges).
 *
 * @module
 */
import { ELEMENTS, outsideRange } from '../../elements/registry.js';
import { formatFrequency } from '../../format/frequency.js';
import { keyArgs, numberArg } from '../args.js';
import type { ElabState } from '../state.js';
import { buildSweep } from '../sweep.js';

export function sweepPass(s: ElabState): void {
  const bag = s.bag;
  // Sweep: the override wins over the file's statements.
  const sweepSource = s.options.sweep && s.options.sweep.length > 0 ? s.options.sweep : s.sweepStatements;
  const frequencies = buildSweep(sweepSource, bag, (a, unit, quantity) => numberArg(s, a, unit, quantity, s.topContext), (st, allowed, what) => keyArgs(s, st, allowed, what), (key) => s.suggestedKeys.has(key));
  s.frequencies = frequencies;
  if (sweepSource.length === 0 && !s.failedKeywords.includes('sweep')) {
    bag.error('no-sweep', 'the netlist has no `sweep`', { file: s.file, line: 1, column: 1, length: 1 }, 'add e.g. `sweep linear start=1 MHz stop=1 GHz points=201`, or give `--sweep` on the command line');
  }

  // Elements defined over a limited band (measured data) must cover the sweep.
  if (frequencies.length > 0) {
    const lo = frequencies[0]!;
    const hi = frequencies[frequencies.length - 1]!;
    for (const { element: el, range } of outsideRange(s.elements, lo, hi)) {
      bag.error('sweep-outside-data', `the sweep (${formatFrequency(lo)} to ${formatFrequency(hi)}) reaches outside the data of \`${el.name}\` (${formatFrequency(range[0])} to ${formatFrequency(range[1])})`, el.span, 'narrow the sweep, or let the element extrapolate with `extrapolate=hold`');
    }
  }

  // Errors of the elements' own over the sweep (a model that cannot be evaluated somewhere).
  if (frequencies.length > 0) {
    for (const el of s.elements) {
      const type = ELEMENTS.get(el.type)!;
      type.checkSweep?.(el, frequencies, (message, _key, help) => bag.error('bad-element', `\`${el.name}\`: ${message}`, el.span, help));
    }
  }

  // Warnings of the elements' own (models outside their ranges, lengths that look mistyped).
  if (frequencies.length > 0 && !bag.hasErrors) {
    const top = frequencies[frequencies.length - 1]!;
    for (const el of s.elements) for (const w of ELEMENTS.get(el.type)!.warnings?.(el, top) ?? []) bag.warning('element-range', `\`${el.name}\`: ${w}`, el.span);
  }
}
