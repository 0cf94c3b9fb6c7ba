/**
 * Matched resistive attenuator pads, designed in the netlist with the standard attenuator design
 * equations and solved through loadNetlist + solveSweep.
 *
 * Source [PAD]: standard attenuator design equations for symmetric pads between equal impedances
 * Z0, with K = 10^(A/20) for an attenuation of A dB (as in Reference Data for Engineers, section on
 * attenuators — the equations and the book's coverage (from memory)):
 *   Π pad: shunt arms R = Z0·(K + 1)/(K − 1), series arm R = Z0·(K² − 1)/(2K)
 *   T pad: series arms R = Z0·(K − 1)/(K + 1), shunt arm R = 2·Z0·K/(K² − 1)
 * Such a pad, terminated in Z0 at both ends, has S11 = S22 = 0 and S21 = S12 = 1/K, i.e.
 * 20·log10|S21| = −A dB. (Both follow from the equations by direct substitution: e.g. for the T pad
 * the input resistance R1 + (R2 ∥ (R1 + Z0)) equals Z0; common practice.)
 *
 * The numbers: a 50 ohm 10 dB Π pad has shunt arms ≈ 96.25 ohm and a series arm ≈ 71.15 ohm
 * (rounded values as quoted in the issue, also the usual table values (from memory)).
 *
 * Tolerances (stated by the brief, checked with margin):
 * - 20·log10|S21| within 1e-9 dB of −A; rounding in a 2–3 unknown solve is ~1e-15 relative, i.e.
 *   ~1e-14 dB.
 * - |S11|, |S22| < 1e-12 (absolute; S11 is computed as v1/√Z0 − 1, a difference of numbers ~1, so
 *   its rounding floor is a few times 1e-16).
 * - S21 = S12 and arg S21 = 0 (a resistive network has real S): to 1e-12 absolute.
 * - Rounded design values: within 0.01 ohm of the quoted 96.25 / 71.15 ohm.
 */
import { describe, expect, it } from 'vitest';

import { loadNetlist } from '../src/load.js';
import { solveSweep } from '../src/solve/sweep.js';
import type { NetworkData } from '../src/network/types.js';

const ATTENUATIONS_DB = [3, 6, 10, 20];
const IMPEDANCES = [50, 75];

/** [PAD] design values, computed here in TypeScript from the equations. */
function piPad(z0: number, db: number): { shunt: number; series: number } {
  const k = 10 ** (db / 20);
  return { shunt: (z0 * (k + 1)) / (k - 1), series: (z0 * (k * k - 1)) / (2 * k) };
}
function tPad(z0: number, db: number): { series: number; shunt: number } {
  const k = 10 ** (db / 20);
  return { series: (z0 * (k - 1)) / (k + 1), shunt: (2 * z0 * k) / (k * k - 1) };
}

/**
 * Π pad netlist. The design is done in the netlist's own `let` expressions (units carried), so the
 * expression evaluator is exercised as well; the same [PAD] equations as {@link piPad}.
 */
function piNetlist(z0: number, db: number): string {
  return `
    title "pi pad ${db} dB ${z0} ohm"
    let z0 = ${z0} ohm
    let att = ${db}
    let k = 10^(att/20)
    let rshunt  = z0*(k + 1)/(k - 1)
    let rseries = z0*(k^2 - 1)/(2*k)
    resistor rs1 a=in  b=ground value=rshunt
    resistor rse a=in  b=out    value=rseries
    resistor rs2 a=out b=ground value=rshunt
    port 1 plus=in  ref=z0
    port 2 plus=out ref=z0
    sweep list freqs=0 Hz, 1 MHz, 1 GHz
  `;
}

/** T pad netlist, designed in the netlist with the [PAD] equations as {@link tPad}. */
function tNetlist(z0: number, db: number): string {
  return `
    title "tee pad ${db} dB ${z0} ohm"
    let z0 = ${z0} ohm
    let att = ${db}
    let k = 10^(att/20)
    let rseries = z0*(k - 1)/(k + 1)
    let rshunt  = 2*z0*k/(k^2 - 1)
    resistor ra a=in  b=mid    value=rseries
    resistor rb a=mid b=out    value=rseries
    resistor rc a=mid b=ground value=rshunt
    port 1 plus=in  ref=z0
    port 2 plus=out ref=z0
    sweep list freqs=0 Hz, 1 MHz, 1 GHz
  `;
}

function sAt(net: NetworkData, k: number, i: number, j: number): { re: number; im: number } {
  const n = net.ports;
  const o = 2 * ((k * n + i) * n + j);
  return { re: net.values[o]!, im: net.values[o + 1]! };
}
const mag = (z: { re: number; im: number }): number => Math.hypot(z.re, z.im);

/** The [PAD] properties of a matched pad of `db` dB, at every frequency point. */
function expectMatchedPad(net: NetworkData, db: number): void {
  expect(net.ports).toBe(2);
  expect(net.frequencies.length).toBe(3);
  for (let k = 0; k < net.frequencies.length; k++) {
    const s11 = sAt(net, k, 0, 0);
    const s22 = sAt(net, k, 1, 1);
    const s21 = sAt(net, k, 1, 0);
    const s12 = sAt(net, k, 0, 1);
    expect(mag(s11)).toBeLessThan(1e-12); // [PAD]: matched
    expect(mag(s22)).toBeLessThan(1e-12); // [PAD]: symmetric, matched at port 2 too
    const s21dB = 20 * Math.log10(mag(s21));
    expect(Math.abs(s21dB + db)).toBeLessThanOrEqual(1e-9); // [PAD]: |S21| = 1/K
    expect(Math.abs(s21.im)).toBeLessThanOrEqual(1e-12); // resistive: S21 real (common practice)
    expect(s21.re).toBeGreaterThan(0); // no inversion through a resistive pad (common practice)
    expect(mag({ re: s21.re - s12.re, im: s21.im - s12.im })).toBeLessThanOrEqual(1e-12); // reciprocity (common practice)
  }
}

describe('symmetric Π attenuator pads [PAD]', () => {
  for (const z0 of IMPEDANCES) {
    for (const db of ATTENUATIONS_DB) {
      it(`${db} dB at ${z0} ohm: S21 = −${db} dB, S11 = S22 = 0`, () => {
        const { circuit } = loadNetlist(piNetlist(z0, db), `pi-${db}-${z0}.sbx`);
        // The netlist's design values equal the ones computed here from the same equations.
        const want = piPad(z0, db);
        const value = (name: string) => circuit.parameters.find((p) => p.name === name)!.value;
        expect(value('rshunt')).toBeCloseTo(want.shunt, 9);
        expect(value('rseries')).toBeCloseTo(want.series, 9);
        expectMatchedPad(solveSweep(circuit), db);
      });
    }
  }
});

describe('symmetric T attenuator pads [PAD]', () => {
  for (const z0 of IMPEDANCES) {
    for (const db of ATTENUATIONS_DB) {
      it(`${db} dB at ${z0} ohm: S21 = −${db} dB, S11 = S22 = 0`, () => {
        const { circuit } = loadNetlist(tNetlist(z0, db), `tee-${db}-${z0}.sbx`);
        const want = tPad(z0, db);
        const value = (name: string) => circuit.parameters.find((p) => p.name === name)!.value;
        expect(value('rseries')).toBeCloseTo(want.series, 9);
        expect(value('rshunt')).toBeCloseTo(want.shunt, 9);
        expectMatchedPad(solveSweep(circuit), db);
      });
    }
  }
});

describe('the issue example: 50 ohm 10 dB Π pad', () => {
  it('has shunt arms ≈ 96.25 ohm and a series arm ≈ 71.15 ohm', () => {
    const { shunt, series } = piPad(50, 10); // [PAD]
    expect(Math.abs(shunt - 96.25)).toBeLessThanOrEqual(0.01); // issue's rounded value
    expect(Math.abs(series - 71.15)).toBeLessThanOrEqual(0.01); // issue's rounded value
  });

  it('built from the rounded values it is close to, but measurably off, the exact design', () => {
    // Rounding the arms to 0.01 ohm leaves a small mismatch: this shows that the 1e-12 match test
    // above is sensitive (it would fail for resistors off by a few milliohms).
    const { circuit } = loadNetlist(
      `
      resistor rs1 a=in  b=ground value=96.25 ohm
      resistor rse a=in  b=out    value=71.15 ohm
      resistor rs2 a=out b=ground value=96.25 ohm
      port 1 plus=in
      port 2 plus=out
      sweep list freqs=1 MHz
    `,
      'pi-rounded.sbx',
    );
    const net = solveSweep(circuit);
    const s11 = mag(sAt(net, 0, 0, 0));
    const s21dB = 20 * Math.log10(mag(sAt(net, 0, 1, 0)));
    // Near the design (tolerances chosen loosely for 0.01 ohm rounding: better than −60 dB
    // return loss, and within 1e-3 dB of 10 dB), yet not exact.
    expect(s11).toBeLessThan(1e-3);
    expect(s11).toBeGreaterThan(1e-12);
    expect(Math.abs(s21dB + 10)).toBeLessThan(1e-3);
  });
});
