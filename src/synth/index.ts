/**
 * Synthesis: `scatterbox design` as a library. A request becomes a netlist text, which is then
 * loaded, solved and checked exactly as `scatterbox check` would (DesignModel, the netlist's own
 * specs).
 *
 * ```ts
 * const d = designFilter(readFilterRequest('lowpass', { response: 'chebyshev', order: '5', cutoff: '600 MHz' }));
 * const { pass, results } = checkDesignText(d.text, 'lowpass.sbx');
 * ```
 *
 * @module
 */
import { DesignModel } from '../design/model.js';
import type { SpecResult } from '../check/types.js';

export { designFilter, minimumOrder, mappedFrequency, DesignRequestError, type FilterDesign, type FilterKind, type FilterRequest, type Part } from './lumped.js';
export { prototype, prototypeGain, butterworthG, chebyshevG, besselPolynomial, besselCutoff, darlington, type Prototype, type AllPoleResponse, type FirstElement } from './prototype.js';
export { readFilterRequest, type RawOptions } from './options.js';
export { designMatch, readMatchRequest, readImpedance, binomialSections, chebyshevSections, transformerReflection, type MatchRequest, type MatchDesign, type MatchNetwork } from './match.js';

import { designFilter as lumpedFilter, DesignRequestError, type FilterRequest } from './lumped.js';
import { designEllipticFilter } from './elliptic-filter.js';
export { designEllipticFilter, ellipticOrder } from './elliptic-filter.js';
export { ellipticResponse, ellipticGain, ellipticLadder } from './elliptic.js';
import { designCoupledBandpass, designSteppedLowpass, designStubLowpass } from './distributed.js';
export { designStubLowpass, designCoupledBandpass, designSteppedLowpass, richardsOmega, type DistributedDesign } from './distributed.js';

/** A filter as asked: lumped, or from lines (`realize`). The result has the written text, a summary and the response. */
export function designAnyFilter(r: FilterRequest): { text: string; summary: string; gain: (f: number) => number } {
  if (r.response === 'elliptic') {
    if (r.realize !== undefined && r.realize !== 'lumped') throw new DesignRequestError(`--realize ${r.realize} takes butterworth, chebyshev or bessel; an elliptic response is made with lumped parts`);
    return designEllipticFilter(r);
  }
  if (r.realize === 'stubs') return designStubLowpass(r);
  if (r.realize === 'coupled-lines') return designCoupledBandpass(r);
  if (r.realize === 'stepped') return designSteppedLowpass(r, r.highZ ?? 2.4 * r.z0, r.lowZ ?? 0.4 * r.z0);
  if (r.highZ !== undefined || r.lowZ !== undefined) throw new DesignRequestError('--high-z and --low-z belong to --realize stepped');
  return lumpedFilter(r);
}

/** Loads a written netlist and checks its specs (throws InputError if the text does not load). */
export function checkDesignText(text: string, file: string): { pass: boolean; results: SpecResult[] } {
  const model = DesignModel.fromText(text, file);
  const results = model.checkSpecs();
  return { pass: results.length > 0 && results.every((r) => r.pass), results };
}
