import type { SourceSpan } from '../diagnostics/diagnostic.js';

/** A limit on a figure over a band, from a `spec` statement. */
export interface SpecDefinition {
  name: string;
  /** The figure as written, e.g. `il(2,1)`. */
  figure: string;
  /** `max`: the figure must stay at or below the limit; `min`: at or above. */
  bound: 'max' | 'min';
  /** Limit at the band's start and at its end (equal for a flat limit; a line between them otherwise). */
  limit: [number, number];
  /** Band in Hz; the upper edge may be Infinity (`above=`), the lower 0 (`below=`). */
  band: [number, number];
  /** Unit of the figure and the limit, for display ('dB', 'deg', 's', 'ohm' or '' for a plain number). */
  unit: string;
  span: SourceSpan;
}

/** The outcome of one spec over the sweep. */
export interface SpecResult {
  spec: SpecDefinition;
  pass: boolean;
  /** Sweep points inside the band. A spec with none fails: it would check nothing. */
  points: number;
  /** Smallest margin over the band (limit − value for `max`, value − limit for `min`); ≥ 0 passes. */
  worstMargin: number;
  /** Frequency (Hz), figure value and limit at the worst point (NaN when there are no points). */
  worstFrequency: number;
  worstValue: number;
  worstLimit: number;
}
