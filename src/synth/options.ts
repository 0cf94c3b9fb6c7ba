/**
 * Reading the options of `scatterbox design` (strings as typed on the command line) into
 * requests. Every problem is a {@link DesignRequestError} that names the option, or an
 * InputError located in the option's text (from evaluateQuantity).
 *
 * @module
 */
import { evaluateQuantity } from '../load.js';
import { isSeriesName, SERIES_NAMES, type SeriesName } from '../design/series.js';
import { DesignRequestError, type FilterKind, type FilterRequest } from './lumped.js';
import { MAX_ORDER, type AllPoleResponse, type FirstElement } from './prototype.js';

/** The raw option values (strings or numbers as yargs gives them; arrays when repeated). */
export type RawOptions = Readonly<Record<string, unknown>>;

/** Frequencies a design takes (Hz). */
export const MIN_DESIGN_FREQUENCY = 1;
export const MAX_DESIGN_FREQUENCY = 1e13;
/** Impedances a design takes (ohm): within the port reference range, with room for the ratios of a design. */
export const MIN_DESIGN_IMPEDANCE = 1e-3;
export const MAX_DESIGN_IMPEDANCE = 1e6;

/** One value of an option (a repeated option is an error). */
function one(raw: RawOptions, key: string, option: string): string | undefined {
  const v = raw[key];
  if (v === undefined || v === null) return undefined;
  if (Array.isArray(v)) throw new DesignRequestError(`--${option} is given more than once`);
  if (typeof v === 'boolean') throw new DesignRequestError(`--${option} needs a value`);
  return String(v);
}

function bounded(x: number, option: string, lo: number, hi: number, unit: string): number {
  if (!(x >= lo && x <= hi)) throw new DesignRequestError(`--${option} must be from ${lo} ${unit} to ${hi} ${unit}, not ${x} ${unit}`.replace(/  +/g, ' '));
  return x;
}

/** A frequency option (`600 MHz`, `2.4e9`). */
export function frequencyOption(raw: RawOptions, key: string, option: string): number | undefined {
  const t = one(raw, key, option);
  if (t === undefined) return undefined;
  return bounded(evaluateQuantity(t, 'Hz', `--${option}`), option, MIN_DESIGN_FREQUENCY, MAX_DESIGN_FREQUENCY, 'Hz');
}

/** A list of frequencies, comma-separated (`1.2 GHz, 1.5 GHz`); repeated options add up. */
export function frequencyList(raw: RawOptions, key: string, option: string): number[] {
  const v = raw[key];
  if (v === undefined || v === null) return [];
  const items = (Array.isArray(v) ? v : [v]).flatMap((x) => String(x).split(',')).map((s) => s.trim());
  if (items.some((s) => s === '')) throw new DesignRequestError(`--${option} has an empty item: give frequencies separated by commas, e.g. "1.2 GHz, 1.5 GHz"`);
  if (items.length > 16) throw new DesignRequestError(`--${option} takes at most 16 frequencies, not ${items.length}`);
  return items.map((s) => bounded(evaluateQuantity(s, 'Hz', `--${option}`), option, MIN_DESIGN_FREQUENCY, MAX_DESIGN_FREQUENCY, 'Hz'));
}

/** A resistance option (`50 ohm`, `75`). */
export function resistanceOption(raw: RawOptions, key: string, option: string): number | undefined {
  const t = one(raw, key, option);
  if (t === undefined) return undefined;
  return bounded(evaluateQuantity(t, 'ohm', `--${option}`), option, MIN_DESIGN_IMPEDANCE, MAX_DESIGN_IMPEDANCE, 'ohm');
}

/** A plain-number option within a range. */
export function numberOption(raw: RawOptions, key: string, option: string, lo: number, hi: number, unit = ''): number | undefined {
  const t = one(raw, key, option);
  if (t === undefined) return undefined;
  // a dB option may be written with its unit: `40 dB` (dB is a dimension of its own, so read it as such)
  const x = unit === 'dB' && /dB\s*$/.test(t) ? evaluateQuantity(t, 'dB', `--${option}`) : evaluateQuantity(t, null, `--${option}`);
  return bounded(x, option, lo, hi, unit);
}

/** A whole-number option. */
export function wholeOption(raw: RawOptions, key: string, option: string, lo: number, hi: number): number | undefined {
  const t = one(raw, key, option);
  if (t === undefined) return undefined;
  const x = Number(t.trim());
  if (!/^\s*\d+\s*$/.test(t) || !Number.isInteger(x) || x < lo || x > hi) throw new DesignRequestError(`--${option} must be a whole number from ${lo} to ${hi}, not ${JSON.stringify(t)}`);
  return x;
}

/** A choice among words. */
export function choiceOption<T extends string>(raw: RawOptions, key: string, option: string, choices: readonly T[], fallback: T): T {
  const t = one(raw, key, option);
  if (t === undefined) return fallback;
  const w = t.trim().toLowerCase();
  const hit = choices.find((c) => c === w);
  if (!hit) throw new DesignRequestError(`--${option} is one of ${choices.join(', ')}, not ${JSON.stringify(t)}`);
  return hit;
}

/** `--series E24`. */
export function seriesOption(raw: RawOptions): SeriesName | undefined {
  const t = one(raw, 'series', 'series');
  if (t === undefined) return undefined;
  const name = t.trim().toUpperCase();
  if (!isSeriesName(name)) throw new DesignRequestError(`--series is one of ${SERIES_NAMES.join(', ')} (IEC 60063), not ${JSON.stringify(t)}`);
  return name;
}

export const RESPONSES = ['butterworth', 'chebyshev', 'bessel', 'elliptic'] as const;
export const FIRST_ELEMENTS = ['shunt', 'series'] as const;
export const FILTER_KINDS = ['lowpass', 'highpass', 'bandpass', 'bandstop'] as const;

/** The request of `design lowpass|highpass|bandpass|bandstop`. */
export function readFilterRequest(kind: FilterKind, raw: RawOptions): FilterRequest {
  const response = choiceOption<AllPoleResponse | 'elliptic'>(raw, 'response', 'response', RESPONSES, 'butterworth');
  const ripple = numberOption(raw, 'ripple', 'ripple', 0.001, 3, 'dB');
  if (ripple !== undefined && response !== 'chebyshev' && response !== 'elliptic') throw new DesignRequestError(`--ripple belongs to --response chebyshev or elliptic; a ${response} response has no ripple`);
  const isBand = kind === 'bandpass' || kind === 'bandstop';
  const cutoff = frequencyOption(raw, 'cutoff', 'cutoff');
  const center = frequencyOption(raw, 'center', 'center');
  const bandwidth = frequencyOption(raw, 'bandwidth', 'bandwidth');
  if (isBand && cutoff !== undefined) throw new DesignRequestError(`a ${kind} filter takes --center and --bandwidth, not --cutoff`);
  if (!isBand && (center !== undefined || bandwidth !== undefined)) throw new DesignRequestError(`a ${kind} filter takes --cutoff, not --center or --bandwidth`);
  const z0 = resistanceOption(raw, 'z0', 'z0') ?? 50;
  const load = resistanceOption(raw, 'load', 'load');
  return {
    kind,
    response,
    order: wholeOption(raw, 'order', 'order', 1, MAX_ORDER),
    rippleDb: ripple ?? 0.1,
    stopAttenDb: numberOption(raw, 'stopAtten', 'stop-atten', 0.1, 200, 'dB'),
    stopEdges: frequencyList(raw, 'stopEdge', 'stop-edge'),
    cutoff,
    center,
    bandwidth,
    z0,
    load,
    first: choiceOption<FirstElement>(raw, 'first', 'first', FIRST_ELEMENTS, 'shunt'),
    series: seriesOption(raw),
    q: numberOption(raw, 'q', 'q', 1, 1e6),
    realize: choiceOption(raw, 'realize', 'realize', REALIZATIONS, 'lumped'),
    highZ: resistanceOption(raw, 'highZ', 'high-z'),
    lowZ: resistanceOption(raw, 'lowZ', 'low-z'),
  };
}

export const REALIZATIONS = ['lumped', 'stubs', 'stepped', 'coupled-lines'] as const;
