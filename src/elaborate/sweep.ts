import type { KeyArg, Statement } from '../ast/ast.js';
import type { DiagnosticBag, SourceSpan } from '../diagnostics/diagnostic.js';
import { didYouMean } from '../diagnostics/suggest.js';
import { MAX_SWEEP_POINTS } from '../limits.js';

type NumberOf = (a: KeyArg, unit: string | null, quantity: string) => number | undefined;
type KeyArgsOf = (st: Statement, allowed: string[], what: string) => Map<string, KeyArg>;

export const SWEEP_KINDS = ['linear', 'log', 'list'] as const;

/** Largest number of points of a whole sweep, all segments together (see src/limits.ts). */
export const MAX_POINTS = MAX_SWEEP_POINTS;

/** One segment, checked and counted, before any point is made. */
type Segment =
  | { kind: 'linear'; start: number; stop: number; count: number; step?: number; span: SourceSpan }
  | { kind: 'log'; start: number; stop: number; count: number; span: SourceSpan }
  | { kind: 'list'; values: number[]; count: number; span: SourceSpan };

const POW10 = Array.from({ length: 23 }, (_, k) => Number(`1e${k}`));

/**
 * A computed point as the double nearest to the decimal it stands for: the point rounded to 15,
 * then 16 significant digits, taken when that moves it by rounding noise only — at most 1e-14
 * relative and at most a millionth of the distance to its neighbours (`spacing`), so that points
 * that differ only in their 16th digit stay apart. Otherwise the point is kept as computed.
 * (`1e9 + 10 * 0.1e9` lands on 1999999999.9999998 or 2000000000.0000002; the decimal meant is 2e9.)
 * The 15-digit rounding is m / 10^k or m · 10^k with m an integer below 10^15 and 10^k exact
 * (k ≤ 22): one correctly rounded operation on exact operands, so it gives the nearest double to
 * the decimal; outside that range, and for 16 digits, Number(v.toPrecision(d)) does.
 */
export function tidyPoint(v: number, spacing: number): number {
  if (v === 0 || !Number.isFinite(v)) return v;
  const a = Math.abs(v);
  const e = Math.floor(Math.log10(a));
  const k = 14 - e;
  let r: number;
  if (k >= 0 && k <= 22) r = Math.round(v * POW10[k]!) / POW10[k]!;
  else if (k < 0 && k >= -22) r = Math.round(v / POW10[-k]!) * POW10[-k]!;
  else r = Number(v.toPrecision(15));
  let moved = Math.abs(r - v);
  if (moved <= 1e-14 * a && moved <= 1e-6 * spacing) return r;
  r = Number(v.toPrecision(16));
  moved = Math.abs(r - v);
  if (moved <= 1e-14 * a && moved <= 1e-6 * spacing) return r;
  return v;
}

/** Two ascending arrays merged into one. */
function mergeAscending(a: Float64Array, b: Float64Array): Float64Array {
  const out = new Float64Array(a.length + b.length);
  let i = 0;
  let j = 0;
  let k = 0;
  while (i < a.length && j < b.length) out[k++] = a[i]! <= b[j]! ? a[i++]! : b[j++]!;
  while (i < a.length) out[k++] = a[i++]!;
  while (j < b.length) out[k++] = b[j++]!;
  return out;
}

/**
 * Builds the sweep from `sweep` statements: each is a segment (linear, logarithmic or an
 * explicit list); segments are joined, sorted ascending and points that coincide (to 1e-12
 * relative) are kept once. Every segment is counted before any point is made: the sweep may have
 * at most MAX_SWEEP_POINTS points in total (before duplicates are merged). Linear points are
 * start + k·(stop − start)/(n − 1) (no running sum), logarithmic ones 10^(lg start + k·(lg stop −
 * lg start)/(n − 1)) (in logarithms, so that no ratio overflows); both are then tidied to the
 * decimal they stand for (see {@link tidyPoint}); `start` and `stop` are kept exactly as given.
 */
export function buildSweep(
  statements: Statement[],
  bag: DiagnosticBag,
  numberOf: NumberOf,
  keyArgs: KeyArgsOf,
  /** Whether a misspelt argument of the last statement read was taken to mean `key` (already reported). */
  suggested: (key: string) => boolean = () => false,
): Float64Array {
  const segments: Segment[] = [];
  let total = 0;
  let tooMany = false;
  const count = (seg: Segment, span: SourceSpan) => {
    total += seg.count;
    if (!tooMany && total > MAX_SWEEP_POINTS) {
      tooMany = true;
      const all = Number.isFinite(total) && total < 1e15 ? `${total}` : 'more than 10^15';
      const what = segments.length > 0 ? `${all} points, all segments together` : `${all} points`;
      bag.error('bad-sweep', `the sweep would have ${what} (at most ${MAX_SWEEP_POINTS})`, span);
    }
    if (!tooMany) segments.push(seg);
  };
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
      const values: number[] = [];
      for (const e of a.values) {
        const v = numberOf({ ...a, values: [e] }, 'Hz', 'frequency');
        if (v === undefined) continue;
        if (v < 0) bag.error('bad-sweep', 'a frequency cannot be negative', e.span);
        else values.push(v);
      }
      count({ kind: 'list', values, count: values.length, span: a.span }, a.span);
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
    if (kind === 'log' && !(start > 0)) {
      bag.error('bad-sweep', 'a logarithmic sweep must start above 0 Hz', args.get('start')!.values[0]!.span);
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
    if (pointsArg) {
      const n = numberOf(pointsArg, null, 'number of points');
      if (n === undefined) continue;
      if (!Number.isInteger(n) || n < 1 || n > MAX_SWEEP_POINTS || (n === 1 && stop !== start)) {
        bag.error('bad-sweep', n === 1 ? 'one point needs `start` equal to `stop`' : `\`points\` must be a whole number from 1 to ${MAX_SWEEP_POINTS}`, pointsArg.values[0]!.span);
        continue;
      }
      count({ kind: kind as 'linear' | 'log', start, stop, count: n, span: pointsArg.span }, pointsArg.span);
    } else if (kind === 'linear') {
      const step = freq(otherArg);
      if (step === undefined) continue;
      if (!(step > 0)) {
        bag.error('bad-sweep', '`step` must be above 0 Hz', otherArg!.values[0]!.span);
        continue;
      }
      const n = Math.floor((stop - start) / step + 1e-9) + 1;
      count({ kind: 'linear', start, stop, step, count: Number.isFinite(n) ? n : Infinity, span: otherArg!.span }, otherArg!.span);
    } else {
      const perDecade = numberOf(otherArg!, null, 'number of points per decade');
      if (perDecade === undefined) continue;
      if (!Number.isInteger(perDecade) || perDecade < 1) {
        bag.error('bad-sweep', '`per_decade` must be a whole number from 1', otherArg!.values[0]!.span);
        continue;
      }
      // in logarithms: stop/start itself may overflow (1e9 / 1e-300)
      const decades = Math.log10(stop) - Math.log10(start);
      const n = Math.max(1, Math.round(decades * perDecade) + 1);
      count({ kind: 'log', start, stop, count: Number.isFinite(n) ? n : Infinity, span: otherArg!.span }, otherArg!.span);
    }
  }
  if (tooMany) return new Float64Array(0);

  // each segment ascending, then merged (a typed-array sort of millions of points is slow)
  let runs: Float64Array[] = [];
  for (const seg of segments) {
    if (seg.kind === 'list') {
      runs.push(Float64Array.from(seg.values.slice().sort((a, b) => a - b)));
      continue;
    }
    const { start, stop, count: n } = seg;
    const run = new Float64Array(n);
    runs.push(run);
    run[0] = start;
    if (n === 1) continue;
    if (seg.kind === 'linear') {
      const step = seg.step;
      for (let k = 1; k < n - 1; k++) run[k] = step === undefined ? start + (stop - start) * (k / (n - 1)) : start + k * step;
      // a `step` sweep ends where its steps end
      run[n - 1] = step === undefined ? stop : start + (n - 1) * step;
      continue;
    }
    const lo = Math.log10(start);
    const decades = Math.log10(stop) - lo;
    for (let k = 1; k < n - 1; k++) run[k] = Math.pow(10, lo + decades * (k / (n - 1)));
    run[n - 1] = stop;
  }
  while (runs.length > 1) {
    const next: Float64Array[] = [];
    for (let i = 0; i < runs.length; i += 2) next.push(i + 1 < runs.length ? mergeAscending(runs[i]!, runs[i + 1]!) : runs[i]!);
    runs = next;
  }
  const sorted = runs[0] ?? new Float64Array(0);
  // points that coincide are kept once (in place); then each is tidied against its neighbours
  let n = 0;
  for (let i = 0; i < sorted.length; i++) {
    const f = sorted[i]!;
    if (n > 0 && Math.abs(f - sorted[n - 1]!) <= 1e-12 * Math.max(Math.abs(f), 1e-300)) continue;
    sorted[n++] = f;
  }
  const result = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const gap = Math.min(i > 0 ? sorted[i]! - sorted[i - 1]! : Infinity, i + 1 < n ? sorted[i + 1]! - sorted[i]! : Infinity);
    result[i] = tidyPoint(sorted[i]!, Number.isFinite(gap) ? gap : Math.abs(sorted[i]!));
  }
  return result;
}
