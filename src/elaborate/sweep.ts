import type { KeyArg, Statement } from '../ast/ast.js';
import type { DiagnosticBag } from '../diagnostics/diagnostic.js';
import { didYouMean } from '../diagnostics/suggest.js';

type NumberOf = (a: KeyArg, unit: string | null, quantity: string) => number | undefined;
type KeyArgsOf = (st: Statement, allowed: string[], what: string) => Map<string, KeyArg>;

export const SWEEP_KINDS = ['linear', 'log', 'list'] as const;

/** Largest number of points a sweep may have (a guard against a typo such as `points=1e9`). */
export const MAX_POINTS = 10_000_000;

/**
 * Builds the sweep from `sweep` statements: each is a segment (linear, logarithmic or an
 * explicit list); segments are joined, sorted ascending and points that coincide (to 1e-12
 * relative) are kept once.
 */
export function buildSweep(
  statements: Statement[],
  bag: DiagnosticBag,
  numberOf: NumberOf,
  keyArgs: KeyArgsOf,
  /** Whether a misspelt argument of the last statement read was taken to mean `key` (already reported). */
  suggested: (key: string) => boolean = () => false,
): Float64Array {
  const all: number[] = [];
  for (const st of statements) {
    const kind = st.label && !st.label.isNumber ? st.label.text : undefined;
    if (!kind || !(SWEEP_KINDS as readonly string[]).includes(kind)) {
      bag.error(
        'bad-sweep',
        kind ? `unknown sweep kind \`${kind}\`` : 'a sweep needs its kind after `sweep`',
        st.label?.span ?? st.keywordSpan,
        (kind && didYouMean(kind, SWEEP_KINDS)) || `the kinds are: ${SWEEP_KINDS.join(', ')}`,
      );
      continue;
    }
    const freq = (a: KeyArg | undefined) => (a ? numberOf(a, 'Hz', 'frequency') : undefined);
    if (kind === 'list') {
      const args = keyArgs(st, ['freqs'], '`sweep list`');
      const a = args.get('freqs');
      if (!a) {
        if (suggested('freqs')) continue;
        bag.error('bad-sweep', '`sweep list` needs `freqs=f1, f2, …`', st.span, 'e.g. `sweep list freqs=315 MHz, 433 MHz, 868 MHz`');
        continue;
      }
      for (const e of a.values) {
        const v = numberOf({ ...a, values: [e] }, 'Hz', 'frequency');
        if (v === undefined) continue;
        if (v < 0) bag.error('bad-sweep', 'a frequency cannot be negative', e.span);
        else all.push(v);
      }
      continue;
    }
    const allowed = kind === 'linear' ? ['start', 'stop', 'points', 'step'] : ['start', 'stop', 'points', 'per_decade'];
    const args = keyArgs(st, allowed, `\`sweep ${kind}\``);
    const start = freq(args.get('start'));
    const stop = freq(args.get('stop'));
    for (const k of ['start', 'stop']) {
      if (!args.has(k) && !suggested(k)) bag.error('bad-sweep', `\`sweep ${kind}\` needs \`${k}=<frequency>\``, st.span);
    }
    if (start === undefined || stop === undefined) continue;
    if (start < 0 || stop < start) {
      bag.error('bad-sweep', start < 0 ? 'a frequency cannot be negative' : '`stop` must not be below `start`', (start < 0 ? args.get('start') : args.get('stop'))!.span);
      continue;
    }
    const countKey = kind === 'linear' ? 'step' : 'per_decade';
    const pointsArg = args.get('points');
    const otherArg = args.get(countKey);
    if ((pointsArg ? 1 : 0) + (otherArg ? 1 : 0) !== 1) {
      if (!pointsArg && !otherArg && (suggested('points') || suggested(countKey))) continue;
      bag.error('bad-sweep', `\`sweep ${kind}\` needs exactly one of \`points\` and \`${countKey}\``, st.span);
      continue;
    }
    let points: number;
    if (pointsArg) {
      const n = numberOf(pointsArg, null, 'number of points');
      if (n === undefined) continue;
      if (!Number.isInteger(n) || n < 1 || n > MAX_POINTS || (n === 1 && stop !== start)) {
        bag.error('bad-sweep', n === 1 ? 'one point needs `start` equal to `stop`' : `\`points\` must be a whole number from 1 to ${MAX_POINTS}`, pointsArg.values[0]!.span);
        continue;
      }
      points = n;
    } else if (kind === 'linear') {
      const step = freq(otherArg);
      if (step === undefined) continue;
      if (!(step > 0)) {
        bag.error('bad-sweep', '`step` must be above 0 Hz', otherArg!.values[0]!.span);
        continue;
      }
      points = Math.floor((stop - start) / step + 1e-9) + 1;
      if (points > MAX_POINTS) {
        bag.error('bad-sweep', `the sweep would have ${points} points (at most ${MAX_POINTS})`, otherArg!.span);
        continue;
      }
      for (let i = 0; i < points; i++) all.push(start + i * step);
      continue;
    } else {
      const perDecade = numberOf(otherArg!, null, 'number of points per decade');
      if (perDecade === undefined) continue;
      if (!Number.isInteger(perDecade) || perDecade < 1) {
        bag.error('bad-sweep', '`per_decade` must be a whole number from 1', otherArg!.values[0]!.span);
        continue;
      }
      if (!(start > 0)) {
        bag.error('bad-sweep', 'a logarithmic sweep must start above 0 Hz', args.get('start')!.values[0]!.span);
        continue;
      }
      points = Math.max(1, Math.round(Math.log10(stop / start) * perDecade) + 1);
    }
    if (kind === 'log' && !(start > 0)) {
      bag.error('bad-sweep', 'a logarithmic sweep must start above 0 Hz', args.get('start')!.values[0]!.span);
      continue;
    }
    for (let i = 0; i < points; i++) {
      const t = points === 1 ? 0 : i / (points - 1);
      all.push(kind === 'linear' ? start + (stop - start) * t : i === points - 1 ? stop : start * Math.pow(stop / start, t));
    }
  }
  all.sort((a, b) => a - b);
  const out: number[] = [];
  for (const f of all) {
    const last = out[out.length - 1];
    if (last !== undefined && Math.abs(f - last) <= 1e-12 * Math.max(Math.abs(f), 1e-300)) continue;
    out.push(f);
  }
  return Float64Array.from(out);
}
