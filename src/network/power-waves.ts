/**
 * Complex reference impedances with power waves (Kurokawa, 1965).
 *
 * For port i with reference Zr_i = R_i + jX_i (R_i > 0), the power waves are
 *   a = F·(V + Zr·I),  b = F·(V − Zr*·I),  F = diag(1/(2√R_i)),
 * and b = S·a. With V = Z·I this gives
 *   S = F·(Z − Zr*)·(Z + Zr)⁻¹·F⁻¹,
 *   Z = F⁻¹·(U − S)⁻¹·(F·Zr* + S·F·Zr),
 * which reduce to the real-reference formulas of convert.ts when X = 0. A port terminated in
 * Zr_i* reflects nothing (|a|² − |b|² is the power delivered, so a conjugate match is b = 0).
 *
 * These conversions go through Z, which must exist (it does not for a network that is only a
 * series element between two ports); they allocate per call and are meant for data at rest.
 *
 * @module
 */
import { createLu, createMatrix, luFactor, luSolve, LU_OK } from './complex.js';
import type { NetworkData } from './types.js';

function refsOf(net: NetworkData): { re: Float64Array; im: Float64Array } {
  return { re: net.references, im: net.referenceReactances ?? new Float64Array(net.ports) };
}

/** Z of every frequency point of S data with (possibly complex) references. */
function impedances(net: NetworkData): Float64Array {
  const n = net.ports;
  const { re, im } = refsOf(net);
  const out = new Float64Array(net.values.length);
  const m = createMatrix(n);
  const rhs = createMatrix(n);
  const lu = createLu(n);
  for (let k = 0; k < net.frequencies.length; k++) {
    const o = 2 * n * n * k;
    // M = U − S;  RHS = F·Zr* + S·F·Zr;  then Z = F⁻¹·M⁻¹·RHS
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        const sr = net.values[o + 2 * (i * n + j)]!;
        const si = net.values[o + 2 * (i * n + j) + 1]!;
        m[2 * (i * n + j)] = (i === j ? 1 : 0) - sr;
        m[2 * (i * n + j) + 1] = -si;
        const f = 1 / (2 * Math.sqrt(re[j]!));
        // S_ij·F_j·Zr_j
        let rr = (sr * re[j]! - si * im[j]!) * f;
        let ri = (sr * im[j]! + si * re[j]!) * f;
        if (i === j) {
          rr += re[i]! * f;
          ri -= im[i]! * f;
        }
        rhs[2 * (i * n + j)] = rr;
        rhs[2 * (i * n + j) + 1] = ri;
      }
    }
    if (luFactor(n, m, lu, 0) !== LU_OK) {
      throw new RangeError(`Z-parameters do not exist at frequency point ${k} (${net.frequencies[k]} Hz): U − S is singular`);
    }
    luSolve(lu, rhs, rhs, n);
    for (let i = 0; i < n; i++) {
      const fi = 2 * Math.sqrt(re[i]!);
      for (let j = 0; j < n; j++) {
        out[o + 2 * (i * n + j)] = rhs[2 * (i * n + j)]! * fi;
        out[o + 2 * (i * n + j) + 1] = rhs[2 * (i * n + j) + 1]! * fi;
      }
    }
  }
  return out;
}

/** S from Z for (possibly complex) references: S = F·(Z − Zr*)·(Z + Zr)⁻¹·F⁻¹. */
function scattering(n: number, z: Float64Array, frequencies: Float64Array, re: Float64Array, im: Float64Array): Float64Array {
  const out = new Float64Array(z.length);
  const a = createMatrix(n); // (Z + Zr)ᵀ
  const b = createMatrix(n); // (Z − Zr*)ᵀ
  const lu = createLu(n);
  for (let k = 0; k < frequencies.length; k++) {
    const o = 2 * n * n * k;
    // X·(Z + Zr) = (Z − Zr*)  ⇔  (Z + Zr)ᵀ·Xᵀ = (Z − Zr*)ᵀ
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        const zr = z[o + 2 * (i * n + j)]!;
        const zi = z[o + 2 * (i * n + j) + 1]!;
        const t = 2 * (j * n + i);
        a[t] = zr + (i === j ? re[i]! : 0);
        a[t + 1] = zi + (i === j ? im[i]! : 0);
        b[t] = zr - (i === j ? re[i]! : 0);
        b[t + 1] = zi + (i === j ? im[i]! : 0);
      }
    }
    if (luFactor(n, a, lu, 0) !== LU_OK) throw new RangeError(`S-parameters do not exist at frequency point ${k}: Z + Zr is singular`);
    luSolve(lu, b, b, n);
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        // X = (Xᵀ)ᵀ; S = F·X·F⁻¹ with F_i = 1/(2√R_i)
        const scale = Math.sqrt(re[j]!) / Math.sqrt(re[i]!);
        out[o + 2 * (i * n + j)] = b[2 * (j * n + i)]! * scale;
        out[o + 2 * (i * n + j) + 1] = b[2 * (j * n + i) + 1]! * scale;
      }
    }
  }
  return out;
}

/**
 * Re-expresses S data for new reference impedances `re + j·im` (per port; `im` may be omitted for
 * real ones), from whatever references it has now, real or complex. Goes through Z.
 */
export function renormalizeComplex(net: NetworkData, re: Float64Array, im?: Float64Array): NetworkData {
  if (net.parameter !== 'S') throw new RangeError('renormalising to complex references needs S-parameters');
  const n = net.ports;
  if (re.length !== n || (im && im.length !== n)) throw new RangeError(`${n} reference impedances are needed, one per port`);
  if (re.some((r) => !(r > 0))) throw new RangeError('the real part of every reference must be above 0');
  const x = im ?? new Float64Array(n);
  const values = scattering(n, impedances(net), net.frequencies, re, x);
  const result: NetworkData = { ...net, frequencies: net.frequencies.slice(), references: Float64Array.from(re), values };
  if (x.some((v) => v !== 0)) result.referenceReactances = Float64Array.from(x);
  else delete result.referenceReactances;
  return result;
}

/** Turns data with complex references into data with the given real references (default: 50 ohm). */
export function fromComplexReferences(net: NetworkData, references: Float64Array = new Float64Array(net.ports).fill(50)): NetworkData {
  return renormalizeComplex(net, references);
}
