import {
  dbToNp,
  lineFromElectricalLength,
  lineFromLength,
  lineGammaLength,
  type LineLoss,
  type TemLine,
} from '../models/line.js';
import type { ElementInstance, ElementType, PropertySpec, StampBuilder } from './types.js';

/**
 * An ideal TEM transmission-line section (model: src/models/line.ts — real Z0, β ∝ f, conductor
 * loss ∝ √f and dielectric loss ∝ f, no DC resistance).
 *
 * Length: either `theta` (the electrical length at a stated frequency, `theta=90 deg at 2.45 GHz`)
 * or `length` (metres) with the phase velocity from `eeff` or `vf` (air when neither is given).
 * Loss: `alpha_c` (conductor) and `alpha_d` (dielectric), in dB per metre at a stated frequency;
 * both are per metre, so they need `length` (with `theta`, `length` then serves only to turn them
 * into the section's loss).
 *
 * Stamp (the wave form: bounded at every frequency and loss, including 0 Hz and every multiple of
 * a half wave, where the admittance form does not exist, and any attenuation, where the chain form's
 * cosh γℓ and sinh γℓ grow as e^(αℓ) and its rows cancel): with V1 = v(a) − v(a_ret),
 * V2 = v(b) − v(b_ret) and I1, I2 the currents into the line at terminals a and b (out again at
 * a_ret and b_ret), the waves a_k = (V_k + Z0·I_k)/2 into and b_k = (V_k − Z0·I_k)/2 out of end k of
 * a matched section obey b1 = e^(−γℓ)·a2 and b2 = e^(−γℓ)·a1 (common practice; Pozar, Microwave
 * Engineering, transmission-line chapter: a matched line has S21 = e^(−γℓ)):
 *   V1 − Z0·I1 − E·(V2 + Z0·I2) = 0,   V2 − Z0·I2 − E·(V1 + Z0·I1) = 0,   E = e^(−γℓ),
 * and KCL +I1 at a, −I1 at a_ret, +I2 at b, −I2 at b_ret. |E| ≤ 1, so every coefficient is of
 * order one; for a large loss E underflows to 0 and each end becomes Z0 to its return. (These rows
 * are the chain-form rows r1: V1 − A·V2 + B·I2 = 0 and r2: Z0·I1 − Z0·C·V2 + D·Z0·I2 = 0 combined as
 * r1 − r2 and −E·(r1 + r2); solving them for I gives Y11 = coth(γℓ)/Z0, Y12 = −csch(γℓ)/Z0.) The two branch unknowns are the currents scaled by the power of
 * two zs nearest to Z0 (u = zs·I, in volts; {@link currentScale}), so that every coefficient is of
 * order one or 1/Z0, like the nodal entries around it, and 1/zs and Z0/zs are exact.
 *
 * With a_ret and b_ret the section is a four-terminal one carrying the differential mode only (the
 * current into a leaves at a_ret): it gives no path from its conductors to ground.
 */

// ------------------------------------------------------------------------------------------------
// shared by the line, the stubs and the coupled pair

/** The keys that fix a TEM section's impedance, length and loss (line and stubs share them). */
export const TEM_SECTION_PROPERTIES: readonly PropertySpec[] = [
  { key: 'z0', unit: 'ohm', quantity: 'impedance', required: true, sign: 'positive', doc: 'characteristic impedance (real)' },
  {
    key: 'theta',
    unit: 'rad',
    quantity: 'angle',
    takesAt: true,
    sign: 'positive',
    doc: 'electrical length at the frequency after `at` (write `90 deg`; a bare number is in radians)',
  },
  { key: 'length', unit: 'm', quantity: 'length', sign: 'positive', doc: 'physical length' },
  { key: 'eeff', unit: null, quantity: 'effective permittivity', doc: 'effective relative permittivity (≥ 1), with `length`; default 1 (air)' },
  { key: 'vf', unit: null, quantity: 'velocity factor', doc: 'velocity factor, phase velocity over c0, in (0, 1], with `length`' },
  {
    key: 'alpha_c',
    unit: 'dB/m',
    quantity: 'attenuation',
    takesAt: true,
    sign: 'nonnegative',
    doc: 'conductor attenuation per metre at the frequency after `at` (scales as √f); needs `length`',
  },
  {
    key: 'alpha_d',
    unit: 'dB/m',
    quantity: 'attenuation',
    takesAt: true,
    sign: 'nonnegative',
    doc: 'dielectric attenuation per metre at the frequency after `at` (scales as f); needs `length`',
  },
];

type Fail = (message: string, key?: string, help?: string) => void;

/** Cross-key rules of {@link TEM_SECTION_PROPERTIES}. */
export function validateTemSection(el: ElementInstance, fail: Fail): void {
  const p = el.props;
  const hasTheta = p.theta !== undefined;
  const hasLength = p.length !== undefined;
  const hasLoss = p.alpha_c !== undefined || p.alpha_d !== undefined;
  if (!hasTheta && !hasLength) {
    fail('give the length either as `theta` (electrical length at a frequency) or as `length`', undefined, 'e.g. `theta=90 deg at 2.45 GHz` or `length=30 mm`');
  }
  if (hasTheta && hasLength && !hasLoss) {
    fail(
      'give either `theta` or `length`, not both (with `theta`, `length` is used only to scale a loss given per metre)',
      'length',
    );
  }
  if (hasTheta && !(el.at.theta! > 0)) fail('the frequency after `at` must be above 0 Hz', 'theta');
  if (hasTheta && p.eeff !== undefined) fail('`eeff` sets the phase of a `length`; with `theta` the phase is given already', 'eeff');
  if (hasTheta && p.vf !== undefined) fail('`vf` sets the phase of a `length`; with `theta` the phase is given already', 'vf');
  if (p.eeff !== undefined && p.vf !== undefined) fail('give either `eeff` or `vf`, not both', 'vf');
  if (p.eeff !== undefined && !(p.eeff >= 1)) fail('`eeff` must be 1 or more', 'eeff');
  if (p.vf !== undefined && !(p.vf > 0 && p.vf <= 1)) fail('`vf` must be above 0 and at most 1', 'vf');
  for (const key of ['alpha_c', 'alpha_d'] as const) {
    if (p[key] === undefined) continue;
    if (!(el.at[key]! > 0)) fail('the frequency after `at` must be above 0 Hz', key);
    if (!hasLength) fail(`\`${key}\` is given per metre, so the section needs \`length\` as well`, key, 'add `length=<m>`');
  }
}

/**
 * The section's loss from `alpha_c` / `alpha_d` (dB/m at their own frequencies), as one
 * {@link LineLoss} at the dielectric term's frequency (or the conductor's when alone); the
 * conductor term is moved there by its √f law. Undefined when neither is given.
 */
export function temSectionLoss(el: ElementInstance): LineLoss | undefined {
  const ac = el.props.alpha_c;
  const ad = el.props.alpha_d;
  if (ac === undefined && ad === undefined) return undefined;
  const at = ad !== undefined ? el.at.alpha_d! : el.at.alpha_c!;
  const conductor = ac === undefined ? 0 : dbToNp(ac) * Math.sqrt(at / el.at.alpha_c!);
  const dielectric = ad === undefined ? 0 : dbToNp(ad);
  return { conductor, dielectric, at };
}

/** Builds the model section of an element with {@link TEM_SECTION_PROPERTIES} (elaboration time). */
export function temSectionOf(el: ElementInstance): TemLine {
  const p = el.props;
  const loss = temSectionLoss(el);
  if (p.theta !== undefined) {
    return lineFromElectricalLength({
      z0: p.z0!,
      theta: p.theta,
      at: el.at.theta!,
      ...(p.length !== undefined ? { length: p.length } : {}),
      ...(loss ? { loss } : {}),
    });
  }
  return lineFromLength({
    z0: p.z0!,
    length: p.length!,
    ...(p.eeff !== undefined ? { eeff: p.eeff } : {}),
    ...(p.vf !== undefined ? { velocityFactor: p.vf } : {}),
    ...(loss ? { loss } : {}),
  });
}

/** Adds (re, im) into slot k (nothing for a ground slot, k < 0). */
export function addSlot(v: Float64Array, k: number, re: number, im: number): void {
  if (k < 0) return;
  v[2 * k] += re;
  v[2 * k + 1] += im;
}

/**
 * Slots of a two-port section in wave form between terminal pairs (a, aRet) and (b, bRet), with
 * branch unknowns u1 = zs·I1 and u2 = zs·I2 (see the module comment). Order:
 *   0 [a,u1] 1 [aRet,u1] 2 [b,u2] 3 [bRet,u2]
 *   4 [u1,a] 5 [u1,aRet] 6 [u1,u1] 7 [u1,b] 8 [u1,bRet] 9 [u1,u2]
 *   10 [u2,b] 11 [u2,bRet] 12 [u2,u2] 13 [u2,a] 14 [u2,aRet] 15 [u2,u1]
 */
export function chainSlots(builder: StampBuilder, a: number, aRet: number, b: number, bRet: number, name: string): Int32Array {
  const u1 = builder.branch(`current into ${name} at its first end`);
  const u2 = builder.branch(`current into ${name} at its second end`);
  const e = (r: number, c: number) => builder.entry(r, c);
  return Int32Array.of(
    e(a, u1), e(aRet, u1), e(b, u2), e(bRet, u2),
    e(u1, a), e(u1, aRet), e(u1, u1), e(u1, b), e(u1, bRet), e(u1, u2),
    e(u2, b), e(u2, bRet), e(u2, u2), e(u2, a), e(u2, aRet), e(u2, u1),
  );
}

/**
 * Adds the wave-form stamp of a matched TEM section (see the module comment) on slots from
 * {@link chainSlots}: characteristic impedance z0, total propagation γℓ = a + jb (a ≥ 0), currents
 * scaled by zs (ohms; the section's z0 itself, or a fixed impedance where z0 varies with frequency).
 * Every coefficient is bounded (|e^(−γℓ)| ≤ 1): nothing overflows at any loss, and a lossless
 * section at a half wave is as regular as anywhere else. Allocates nothing.
 */
export function addWaveStamp(v: Float64Array, s: Int32Array, z0: number, a: number, b: number, zs: number): void {
  const g = 1 / zs;
  const r = z0 / zs;
  // E = e^(−γℓ) = e^(−a)·(cos b − j sin b); underflows gracefully to 0 for a large loss
  const ea = Math.exp(-a);
  const er = ea * Math.cos(b);
  const ei = -ea * Math.sin(b);
  addSlot(v, s[0]!, g, 0);
  addSlot(v, s[1]!, -g, 0);
  addSlot(v, s[2]!, g, 0);
  addSlot(v, s[3]!, -g, 0);
  // V1 − r·u1 − E·V2 − E·r·u2 = 0   (b1 = E·a2)
  addSlot(v, s[4]!, 1, 0);
  addSlot(v, s[5]!, -1, 0);
  addSlot(v, s[6]!, -r, 0);
  addSlot(v, s[7]!, -er, -ei);
  addSlot(v, s[8]!, er, ei);
  addSlot(v, s[9]!, -er * r, -ei * r);
  // V2 − r·u2 − E·V1 − E·r·u1 = 0   (b2 = E·a1)
  addSlot(v, s[10]!, 1, 0);
  addSlot(v, s[11]!, -1, 0);
  addSlot(v, s[12]!, -r, 0);
  addSlot(v, s[13]!, -er, -ei);
  addSlot(v, s[14]!, er, ei);
  addSlot(v, s[15]!, -er * r, -ei * r);
}

/**
 * The chain-form stamp of a two-port with ABCD matrix m[o..o+7] (layout of src/network/complex.ts),
 * on slots from {@link chainSlots}, currents scaled by zs: V1 − A·V2 + (B/zs)·u2 = 0 and
 * u1 − (C·zs)·V2 + D·u2 = 0. Kept for sections known only by their ABCD matrix; a TEM section uses
 * {@link addWaveStamp}, whose coefficients stay bounded where A…D grow as e^(αℓ). Allocates nothing.
 */
export function addChainStamp(v: Float64Array, s: Int32Array, m: Float64Array, o: number, zs: number): void {
  const g = 1 / zs;
  addSlot(v, s[0]!, g, 0);
  addSlot(v, s[1]!, -g, 0);
  addSlot(v, s[2]!, g, 0);
  addSlot(v, s[3]!, -g, 0);
  addSlot(v, s[4]!, 1, 0);
  addSlot(v, s[5]!, -1, 0);
  addSlot(v, s[7]!, -m[o]!, -m[o + 1]!);
  addSlot(v, s[8]!, m[o]!, m[o + 1]!);
  addSlot(v, s[9]!, m[o + 2]! * g, m[o + 3]! * g);
  addSlot(v, s[15]!, 1, 0);
  addSlot(v, s[10]!, -m[o + 4]! * zs, -m[o + 5]! * zs);
  addSlot(v, s[11]!, m[o + 4]! * zs, m[o + 5]! * zs);
  addSlot(v, s[12]!, m[o + 6]!, m[o + 7]!);
}

const TWO_PI = 2 * Math.PI;

/**
 * The power of two nearest to z (ohms), for scaling branch currents: 1/zs and z0/zs are then exact,
 * so that the stamped section has exactly the characteristic impedance given (a rounded 1/Z0 would
 * mismatch a section by about 1e-16, which shows in a reflection of 1e-8 at its eighth digit).
 */
export function currentScale(z: number): number {
  const e = Math.round(Math.log2(z));
  const s = Math.pow(2, e);
  return Number.isFinite(s) && s > 0 ? s : z;
}

// ------------------------------------------------------------------------------------------------
// the element

/**
 * An electrical length of more than two turns is almost always `theta=90` meant as degrees (a bare
 * number is in radians).
 */
export function temSectionWarnings(el: ElementInstance): string[] {
  const th = el.props.theta;
  if (th !== undefined && Math.abs(th) > 4 * Math.PI) {
    return [`its electrical length is ${Number(th.toPrecision(4))} rad (${Number(((th * 180) / Math.PI).toPrecision(5))}°); a bare number is in radians — for degrees write e.g. \`theta=${Number(th.toPrecision(4))} deg\``];
  }
  return [];
}

export const line: ElementType = {
  keyword: 'line',
  summary: 'ideal TEM transmission line from a to b (optional return terminals a_ret, b_ret), with optional loss',
  example: 'line feed a=in b=out z0=50 ohm theta=90 deg at 2.45 GHz',
  terminals: [
    { key: 'a', doc: 'first end' },
    { key: 'b', doc: 'second end' },
    { key: 'a_ret', doc: 'return conductor at the first end', defaultNode: 'ground' },
    { key: 'b_ret', doc: 'return conductor at the second end', defaultNode: 'ground' },
  ],
  // each end's pair has its own common level: an ideal TEM two-port fixes only v(a, a_ret) and
  // v(b, b_ret), so a pair with no path to ground of its own needs a reference of its own
  connections: [
    [0, 2],
    [1, 3],
  ],
  properties: TEM_SECTION_PROPERTIES,
  validate: validateTemSection,
  warnings: (el) => temSectionWarnings(el),
  compile(el, b) {
    const section = temSectionOf(el);
    const [a, bb, aRet, bRet] = el.nodes as [number, number, number, number];
    const s = chainSlots(b, a, aRet, bb, bRet, el.name);
    const z0 = section.z0;
    const zs = currentScale(z0);
    const gl = new Float64Array(2);
    return (omega, v) => {
      lineGammaLength(section, omega / TWO_PI, gl, 0);
      addWaveStamp(v, s, z0, gl[0]!, gl[1]!, zs);
    };
  },
};
