import { ConversionError, renormalizeNetwork } from '../network/convert.js';
import type { NetworkData } from '../network/types.js';

/** How closely two data sets must agree. */
export interface Tolerance {
  /** Largest magnitude difference in dB (default 0.01 dB). */
  db?: number;
  /** Largest phase difference in degrees (default 0.1°). */
  deg?: number;
  /**
   * Compare the complex difference |a − b| instead of dB and degrees, with this bound. When set,
   * `db` and `deg` are ignored.
   */
  abs?: number;
  /**
   * Magnitude floor in dB (default −100 dB): where both values are below it, neither dB nor phase
   * is judged; where one is, magnitudes below the floor count as the floor in the dB difference and
   * the phase is not judged.
   */
  floorDb?: number;
}

/** The worst deviation found for one matrix entry. */
export interface EntryDeviation {
  /** 1-based row and column. */
  i: number;
  j: number;
  /** Worst dB difference and its frequency (Hz); NaN in abs mode. */
  db: number;
  dbFrequency: number;
  /** Worst phase difference (degrees, 0…180) and its frequency. */
  deg: number;
  degFrequency: number;
  /** Worst complex difference |a − b| and its frequency. */
  abs: number;
  absFrequency: number;
  pass: boolean;
}

export interface Comparison {
  entries: EntryDeviation[];
  pass: boolean;
  tolerance: Required<Omit<Tolerance, 'abs'>> & { abs?: number };
}

/** The two data sets cannot be compared point by point (different ports or frequencies). */
export class CompareError extends Error {
  constructor(message: string, readonly help?: string) {
    super(message);
    this.name = 'CompareError';
  }
}

/** Relative tolerance within which two frequency grids count as the same. */
const FREQUENCY_MATCH = 1e-9;

/**
 * Compares two networks entry by entry at every frequency: the worst magnitude difference in dB,
 * the worst phase difference in degrees (wrapped to 0…180°) and the worst complex difference,
 * each with the frequency where it occurs. Both must hold the same parameter, port count and
 * frequencies (to 1e-9 relative).
 */
export function compareNetworks(actual: NetworkData, expected: NetworkData, tol: Tolerance = {}): Comparison {
  const tolerance = { db: tol.db ?? 0.01, deg: tol.deg ?? 0.1, floorDb: tol.floorDb ?? -100, abs: tol.abs };
  if (actual.parameter !== expected.parameter) {
    throw new CompareError(`one holds ${actual.parameter}-parameters, the other ${expected.parameter}-parameters`);
  }
  if (actual.ports !== expected.ports) {
    throw new CompareError(`one has ${actual.ports} port(s), the other ${expected.ports}`);
  }
  const nf = actual.frequencies.length;
  if (nf !== expected.frequencies.length) {
    throw new CompareError(
      `one has ${nf} frequency points, the other ${expected.frequencies.length}`,
      'solve with the sweep the reference was made with (or --update the reference)',
    );
  }
  for (let k = 0; k < nf; k++) {
    const a = actual.frequencies[k]!;
    const b = expected.frequencies[k]!;
    if (Math.abs(a - b) > FREQUENCY_MATCH * Math.max(Math.abs(a), Math.abs(b), 1)) {
      throw new CompareError(`frequency point ${k + 1} differs: ${a} Hz against ${b} Hz`, 'both must use the same sweep');
    }
  }
  const n = actual.ports;
  const floorMag = Math.pow(10, tolerance.floorDb / 20);
  const entries: EntryDeviation[] = [];
  let allPass = true;
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      const d: EntryDeviation = { i: i + 1, j: j + 1, db: 0, dbFrequency: NaN, deg: 0, degFrequency: NaN, abs: 0, absFrequency: NaN, pass: true };
      for (let k = 0; k < nf; k++) {
        const o = 2 * ((k * n + i) * n + j);
        const ar = actual.values[o]!;
        const ai = actual.values[o + 1]!;
        const br = expected.values[o]!;
        const bi = expected.values[o + 1]!;
        const f = actual.frequencies[k]!;
        const absDiff = Math.hypot(ar - br, ai - bi);
        if (absDiff > d.abs || Number.isNaN(d.absFrequency)) {
          d.abs = absDiff;
          d.absFrequency = f;
        }
        const ma = Math.hypot(ar, ai);
        const mb = Math.hypot(br, bi);
        if (ma < floorMag && mb < floorMag) continue;
        // magnitudes below the floor count as the floor: a null that filled in shows how far above the floor it rose
        const dbDiff = Math.abs(Math.max(20 * Math.log10(ma), tolerance.floorDb) - Math.max(20 * Math.log10(mb), tolerance.floorDb));
        if (dbDiff > d.db || Number.isNaN(d.dbFrequency)) {
          d.db = dbDiff;
          d.dbFrequency = f;
        }
        if (ma >= floorMag && mb >= floorMag) {
          // angle of a·conj(b): the phase difference, wrapped to (−180°, 180°]
          const pr = ar * br + ai * bi;
          const pi = ai * br - ar * bi;
          const degDiff = Math.abs((Math.atan2(pi, pr) * 180) / Math.PI);
          if (degDiff > d.deg || Number.isNaN(d.degFrequency)) {
            d.deg = degDiff;
            d.degFrequency = f;
          }
        }
      }
      d.pass = tolerance.abs !== undefined ? d.abs <= tolerance.abs : d.db <= tolerance.db && d.deg <= tolerance.deg;
      if (!d.pass) allPass = false;
      entries.push(d);
    }
  }
  return { entries, pass: allPass, tolerance };
}

/** A network brought to another's reference impedances for a comparison, and what was done. */
export interface AlignedNetwork {
  net: NetworkData;
  /** Set when the references differed and `net` was renormalised: a plain sentence for the output. */
  note?: string;
}

const REFERENCE_MATCH = 1e-12;

function describeReferences(r: Float64Array): string {
  const all = Array.from(r, (x) => `${x} Ω`);
  return all.every((x) => x === all[0]) ? all[0]! : all.join(', ');
}

/**
 * Brings `actual` to the reference impedances of `expected` (the reference side of a comparison),
 * so that both describe the network seen from the same ports. S data is renormalised (Kurokawa
 * power waves for real references, as {@link renormalizeNetwork} does); Z and Y do not depend on
 * the references. When the references already agree (to 1e-12 relative), `actual` is returned as
 * it is. When the two differ in their parameter or port count, nothing is done here
 * ({@link compareNetworks} reports that). Throws {@link CompareError} when the renormalisation is
 * impossible: complex references that differ, or S-parameters that do not exist for the new
 * references. `names` are the labels of the two sides in messages.
 */
export function alignReferences(actual: NetworkData, expected: NetworkData, names: { actual: string; expected: string }): AlignedNetwork {
  if (actual.parameter !== expected.parameter || actual.ports !== expected.ports) return { net: actual };
  const n = actual.ports;
  const xa = actual.referenceReactances;
  const xb = expected.referenceReactances;
  let sameR = true;
  let sameX = true;
  for (let p = 0; p < n; p++) {
    const a = actual.references[p]!;
    const b = expected.references[p]!;
    if (Math.abs(a - b) > REFERENCE_MATCH * Math.max(Math.abs(a), Math.abs(b))) sameR = false;
    if ((xa?.[p] ?? 0) !== (xb?.[p] ?? 0)) sameX = false;
  }
  if (sameR && sameX) return { net: actual };
  if (xa?.some((x) => x !== 0) || xb?.some((x) => x !== 0)) {
    throw new CompareError(
      `${names.actual} and ${names.expected} have different reference impedances, some of them complex, and cannot be compared`,
      'bring both to the same real reference impedances first (scatterbox convert --renormalize)',
    );
  }
  const from = describeReferences(actual.references);
  const to = describeReferences(expected.references);
  if (actual.parameter !== 'S') {
    return { net: { ...actual, references: expected.references.slice() }, note: `${names.actual} has references ${from}, ${names.expected} ${to}; ${actual.parameter}-parameters do not depend on them` };
  }
  try {
    const net = renormalizeNetwork(actual, expected.references);
    return { net, note: `${names.actual} renormalised from ${from} to ${to} (the references of ${names.expected}) before comparing` };
  } catch (e) {
    if (e instanceof ConversionError) {
      const where = e.frequency === undefined ? '' : ` at ${e.frequency} Hz`;
      throw new CompareError(`${names.actual} (references ${from}) cannot be renormalised to the references of ${names.expected} (${to})${where}: ${e.reason}`, 'compare files with the same reference impedances');
    }
    throw e;
  }
}
