import type { Expr, KeyArg, Statement } from '../ast/ast.js';
import type { DiagnosticBag } from '../diagnostics/diagnostic.js';
import type { SpecDefinition } from '../check/types.js';
import { FigureError, parseFigure } from '../figures/registry.js';

type NumberOf = (a: KeyArg, unit: string | null, quantity: string) => number | undefined;
type KeyArgsOf = (st: Statement, allowed: string[], what: string) => Map<string, KeyArg>;

const SPEC_KEYS = ['measure', 'max', 'min', 'over', 'above', 'below'];

/** Writes a figure expression back as text: `il(2,1)`, `db(S21)`, `gd(S(1,2))`, `k`. */
export function figureText(e: Expr): string | undefined {
  switch (e.kind) {
    case 'name':
      return e.name;
    case 'number':
      return e.unit === undefined ? e.text : undefined;
    case 'call': {
      const args = e.args.map(figureText);
      if (args.some((a) => a === undefined)) return undefined;
      return `${e.callee}(${args.join(',')})`;
    }
    default:
      return undefined;
  }
}

/** The mathjs unit of a figure's values, for reading its limits ('' → a plain number). */
function limitUnit(unit: string): string | null {
  return unit === '' ? null : unit;
}

/**
 * Elaborates one `spec` statement:
 *
 *     spec <name> measure=<figure> (max|min)=<limit>[, <limit at band end>] (over=<f1>, <f2> | above=<f> | below=<f>)
 *
 * A bare limit is in the figure's own unit (dB, deg, s, ohm, or a plain number).
 */
export function elaborateSpec(
  st: Statement,
  ports: number,
  bag: DiagnosticBag,
  numberOf: NumberOf,
  keyArgs: KeyArgsOf,
  suggested: (key: string) => boolean,
): SpecDefinition | undefined {
  if (!st.label || st.label.isNumber) {
    bag.error('missing-name', '`spec` needs a name after the keyword', st.label?.span ?? st.keywordSpan, 'e.g. `spec passband measure=il(2,1) max=1 dB over=2.40 GHz, 2.48 GHz`');
    return undefined;
  }
  const name = st.label.text;
  const args = keyArgs(st, SPEC_KEYS, '`spec`');
  const measure = args.get('measure');
  if (!measure) {
    if (!suggested('measure')) bag.error('bad-spec', `spec \`${name}\` needs \`measure=<figure>\``, st.label.span, 'e.g. `measure=il(2,1)`, `measure=rl(1)`, `measure=gd(S21)`');
    return undefined;
  }
  if (measure.values.length !== 1 || measure.at) {
    bag.error('bad-spec', '`measure` takes one figure', measure.span);
    return undefined;
  }
  const text = figureText(measure.values[0]!);
  let figure;
  try {
    if (text === undefined) throw new FigureError('figure-syntax', '', 'not a figure name', 'e.g. `il(2,1)`, `rl(1)`, `db(S21)`, `k`');
    figure = parseFigure(text, { ports });
  } catch (e) {
    if (!(e instanceof FigureError)) throw e;
    bag.error('bad-figure', e.detail, measure.values[0]!.span, e.help);
    return undefined;
  }
  const unit = figure.spec.unit;
  const bounds = (['max', 'min'] as const).filter((k) => args.has(k));
  if (bounds.length !== 1) {
    if (!(bounds.length === 0 && (suggested('max') || suggested('min')))) {
      bag.error('bad-spec', bounds.length === 0 ? `spec \`${name}\` needs a limit: \`max=\` or \`min=\`` : 'give either `max=` or `min=`, not both', st.label.span);
    }
    return undefined;
  }
  const bound = bounds[0]!;
  const limArg = args.get(bound)!;
  if (limArg.values.length > 2 || limArg.at) {
    bag.error('bad-spec', `\`${bound}\` takes one limit, or two for a sloped limit (at the band's start and end)`, limArg.span);
    return undefined;
  }
  const limits: number[] = [];
  for (const e of limArg.values) {
    const v = numberOf({ ...limArg, values: [e] }, limitUnit(unit), 'limit');
    if (v === undefined) return undefined;
    limits.push(v);
  }
  const bands = (['over', 'above', 'below'] as const).filter((k) => args.has(k));
  if (bands.length !== 1) {
    if (!(bands.length === 0 && (suggested('over') || suggested('above') || suggested('below')))) {
      bag.error('bad-spec', bands.length === 0 ? `spec \`${name}\` needs a band: \`over=f1, f2\`, \`above=f\` or \`below=f\`` : 'give one band: `over=`, `above=` or `below=`', st.label.span);
    }
    return undefined;
  }
  const bandKey = bands[0]!;
  const bandArg = args.get(bandKey)!;
  const want = bandKey === 'over' ? 2 : 1;
  if (bandArg.values.length !== want || bandArg.at) {
    bag.error('bad-spec', bandKey === 'over' ? '`over` takes two frequencies: the band edges' : `\`${bandKey}\` takes one frequency`, bandArg.span);
    return undefined;
  }
  const freqs: number[] = [];
  for (const e of bandArg.values) {
    const v = numberOf({ ...bandArg, values: [e] }, 'Hz', 'frequency');
    if (v === undefined) return undefined;
    if (v < 0) {
      bag.error('bad-spec', 'a frequency cannot be negative', e.span);
      return undefined;
    }
    freqs.push(v);
  }
  let band: [number, number];
  if (bandKey === 'over') {
    if (freqs[1]! < freqs[0]!) {
      bag.error('bad-spec', 'the band must be written low edge first', bandArg.values[1]!.span);
      return undefined;
    }
    band = [freqs[0]!, freqs[1]!];
  } else band = bandKey === 'above' ? [freqs[0]!, Infinity] : [0, freqs[0]!];
  if (limits.length === 2 && bandKey !== 'over') {
    bag.error('bad-spec', 'a sloped limit needs a band with two edges (`over=f1, f2`)', limArg.span);
    return undefined;
  }
  return {
    name,
    figure: figure.canonical,
    bound,
    limit: [limits[0]!, limits[limits.length - 1]!],
    band,
    unit,
    span: st.span,
  };
}
