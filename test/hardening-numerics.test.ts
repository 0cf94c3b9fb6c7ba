/**
 * Issue 14, accuracy: very lossy lines and stubs (bounded wave-form stamps), small reflections
 * (iterative refinement in double-double), and no non-finite value in a result.
 *
 * Sources (each check names its own beside it):
 * - [MATCHED] a matched TEM line has S11 = S22 = 0 and S21 = S12 = e^(−γℓ) (common practice; Pozar,
 *   Microwave Engineering, transmission-line chapter (from memory)); reciprocity S12 = S21 of any
 *   line (common practice).
 * - [NP] 1 Np = 20·log10(e) dB (common practice).
 * - [STUB] open stub Zin = Z0·coth γℓ, short stub Zin = Z0·tanh γℓ (common practice, same chapter).
 * - [SERIES] a series impedance Z between two equal real references Z0: S11 = Z/(Z + 2·Z0),
 *   S21 = 2·Z0/(Z + 2·Z0) (common practice; derivable from the two-port's ABCD [[1, Z], [0, 1]]).
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { loadNetlist } from '../src/load.js';
import { NonFiniteResultError, SingularSystemError, solveSweep } from '../src/solve/sweep.js';
import { buildPlan } from '../src/plan/plan.js';

const C0 = 299_792_458;
const DB_PER_NP = 20 / Math.LN10;

function solve(text: string, onWarning?: (m: string) => void) {
  return solveSweep(loadNetlist(text, 'numerics.sbx').circuit, onWarning ? { onWarning } : {});
}

/** Relative distance between two complex numbers (re, im pairs) against the second. */
function relErr(ar: number, ai: number, br: number, bi: number): number {
  return Math.hypot(ar - br, ai - bi) / Math.hypot(br, bi);
}

describe('very lossy lines: forward and reverse transmission agree down to the limit of double range', () => {
  // The reproducer of issue 14: alpha_c = 200 dB/m over 1 m gave S12 at −131 dB instead of −200 dB,
  // and beyond ~280 dB the solve was refused as singular. Matched line (z0 = port reference).
  const f = 1e9;
  for (const db of [200, 280, 1000, 3000, 5000, 6000]) {
    it(`alpha_c = ${db} dB/m over 1 m: S21 = S12 = e^(−γℓ) to 1e-9 relative [MATCHED]`, () => {
      const net = solve(`line tl a=in b=out z0=50 ohm length=1 m alpha_c=${db} dB/m at 1 GHz\nport 1 plus=in\nport 2 plus=out\nsweep list freqs=1 GHz\n`);
      const v = net.values;
      // e^(−γℓ) with α = db/8.686 Np/m (at the `at` frequency) and β = 2πf/c0 (air)
      const a = db / DB_PER_NP;
      const b = (2 * Math.PI * f) / C0;
      const er = Math.exp(-a) * Math.cos(b);
      const ei = -Math.exp(-a) * Math.sin(b);
      expect(relErr(v[4]!, v[5]!, er, ei)).toBeLessThan(1e-9); // S21
      expect(relErr(v[2]!, v[3]!, er, ei)).toBeLessThan(1e-9); // S12
      expect(relErr(v[2]!, v[3]!, v[4]!, v[5]!)).toBeLessThan(1e-9); // S12 = S21
      expect(Math.hypot(v[0]!, v[1]!)).toBeLessThan(1e-12); // S11 = 0 for a matched line
      expect(Math.hypot(v[6]!, v[7]!)).toBeLessThan(1e-12); // S22
    });
  }

  it('a mismatched lossy line (z0 = 20 ohm, 75 dB to 3000 dB at 1 GHz, up to 5200 dB at 3 GHz) is reciprocal to 1e-9 relative, and S11 → the step reflection', () => {
    for (const db of [75, 400, 3000]) {
      const net = solve(`line tl a=in b=out z0=20 ohm length=1 m alpha_c=${db} dB/m at 1 GHz\nport 1 plus=in\nport 2 plus=out\nsweep list freqs=0.5 GHz, 1 GHz, 3 GHz\n`);
      for (let k = 0; k < 3; k++) {
        const o = 8 * k;
        const v = net.values;
        expect(relErr(v[o + 2]!, v[o + 3]!, v[o + 4]!, v[o + 5]!)).toBeLessThan(1e-9);
        expect(Number.isFinite(v[o + 4]!) && Math.hypot(v[o + 4]!, v[o + 5]!) > 0).toBe(true);
        if (db >= 400) {
          // no wave comes back from the far end: S11 = (20 − 50)/(20 + 50) (reflection coefficient, common practice)
          expect(v[o]!).toBeCloseTo(-30 / 70, 12);
          expect(v[o + 1]!).toBeCloseTo(0, 12);
        }
      }
    }
  });

  it('random lossy lines, some in cascade with return terminals: S12 = S21 to 1e-9 relative (fast-check, seed 1401)', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 5, max: 200, noNaN: true }),
        fc.double({ min: 0, max: 8000, noNaN: true }),
        fc.double({ min: 0.01, max: 2, noNaN: true }),
        fc.double({ min: 1e6, max: 2e10, noNaN: true }),
        fc.double({ min: 5, max: 200, noNaN: true }),
        fc.boolean(),
        (z0, db, len, freq, z0b, cascade) => {
          const text = cascade
            ? `line t1 a=in b=mid z0=${z0} ohm length=${len} m alpha_d=${db} dB/m at 1 GHz\nline t2 a=mid b=out a_ret=r b_ret=r z0=${z0b} ohm length=${len} m alpha_c=${db / 2} dB/m at 1 GHz\nresistor rr a=r b=ground value=7 ohm\nport 1 plus=in\nport 2 plus=out\nsweep list freqs=${freq} Hz\n`
            : `line t1 a=in b=out z0=${z0} ohm length=${len} m alpha_c=${db} dB/m at 1 GHz\nport 1 plus=in\nport 2 plus=out ref=${z0b} ohm\nsweep list freqs=${freq} Hz\n`;
          const v = solve(text).values;
          for (const x of v) if (!Number.isFinite(x)) return false;
          const s21 = Math.hypot(v[4]!, v[5]!);
          if (s21 < 1e-290) return true; // beyond double range: nothing to compare
          // passivity of a lossy reciprocal two-port: |S11|² + |S21|² ≤ 1 (common practice)
          if (v[0]! ** 2 + v[1]! ** 2 + s21 ** 2 > 1 + 1e-12) return false;
          return relErr(v[2]!, v[3]!, v[4]!, v[5]!) < 1e-9;
        },
      ),
      { seed: 1401, numRuns: 150 },
    );
  });
});

describe('very lossy stubs stay finite and follow their closed forms', () => {
  // Γ = (Zin − 50)/(Zin + 50) with Zin = Z0·coth γℓ (open) or Z0·tanh γℓ (short) [STUB]; for 3000 dB
  // of loss both are Z0 to double precision.
  for (const kind of ['open_stub', 'short_stub']) {
    it(`${kind}, 30 ohm, 3000 dB: S11 = (30 − 50)/(30 + 50) to 1e-12 [STUB]`, () => {
      const net = solve(`${kind} s a=in z0=30 ohm length=1 m alpha_c=3000 dB/m at 1 GHz\nport 1 plus=in\nsweep list freqs=1 GHz, 2 GHz\n`);
      for (let k = 0; k < 2; k++) {
        expect(net.values[2 * k]!).toBeCloseTo(-20 / 80, 12);
        expect(net.values[2 * k + 1]!).toBeCloseTo(0, 12);
      }
    });
  }

  it('open and short stubs with moderate loss match Z0·coth γℓ and Z0·tanh γℓ to 1e-10 [STUB]', () => {
    const a = 3 / DB_PER_NP; // 3 dB over 1 m at 1 GHz
    const b = (2 * Math.PI * 1e9) / C0;
    // coth z, tanh z from e^(−2z) (closed forms, common practice)
    const e2r = Math.exp(-2 * a) * Math.cos(2 * b);
    const e2i = -Math.exp(-2 * a) * Math.sin(2 * b);
    const div = (nr: number, ni: number, dr: number, di: number) => {
      const d = dr * dr + di * di;
      return [(nr * dr + ni * di) / d, (ni * dr - nr * di) / d] as const;
    };
    const coth = div(1 + e2r, e2i, 1 - e2r, -e2i);
    const tanh = div(1 - e2r, -e2i, 1 + e2r, e2i);
    for (const [kind, z] of [['open_stub', coth], ['short_stub', tanh]] as const) {
      const zr = 30 * z[0];
      const zi = 30 * z[1];
      const g = div(zr - 50, zi, zr + 50, zi);
      const net = solve(`${kind} s a=in z0=30 ohm length=1 m alpha_c=3 dB/m at 1 GHz\nport 1 plus=in\nsweep list freqs=1 GHz\n`);
      expect(relErr(net.values[0]!, net.values[1]!, g[0], g[1])).toBeLessThan(1e-10);
    }
  });
});

describe('no NaN or Infinity in a result', () => {
  // A netlist refuses such references at elaboration (grammar/README.md, Limits); a library caller
  // can still hand the solver any reference, and it must not make NaN of it.
  const withReference = (reference: number) => {
    const { circuit } = loadNetlist('resistor r a=in b=ground value=50 ohm\nport 1 plus=in\nsweep list freqs=1 GHz\n', 'numerics.sbx');
    circuit.ports[0]!.reference = reference;
    return solveSweep(circuit);
  };

  it('ref=1e300 ohm gives S11 = (50 − 1e300)/(50 + 1e300) = −1, not NaN (reflection coefficient, common practice)', () => {
    const net = withReference(1e300);
    expect(net.values[0]).toBe(-1);
    expect(net.values[1]).toBe(0);
  });

  it('ref=1e-300 ohm on a 50 ohm load: S11 = +1 to 1e-15 or a located refusal, never NaN', () => {
    try {
      const net = withReference(1e-300);
      expect(net.values[0]).toBeCloseTo(1, 15); // (50 − 1e-300)/(50 + 1e-300) (reflection coefficient, common practice)
    } catch (e) {
      expect(e).toBeInstanceOf(SingularSystemError);
      expect((e as SingularSystemError).frequency).toBe(1e9);
    }
  });

  it('an element whose admittance overflows is a located error naming it and the frequency', () => {
    let caught: unknown;
    try {
      solve('resistor r a=in b=ground value=50 ohm\ncapacitor huge a=in b=ground value=1e300 F\nport 1 plus=in\nsweep list freqs=1 GHz\n');
    } catch (e) {
      caught = e;
    }
    expect(caught).toBeInstanceOf(NonFiniteResultError);
    const e = caught as NonFiniteResultError;
    expect(e.frequency).toBe(1e9);
    expect(e.culprits).toEqual(['huge']);
    expect(e.message).toMatch(/at 1 GHz: element `huge` \(numerics\.sbx:2\) gives values out of floating-point range/);
  });

  it('a result that overflows after a regular factorisation is an error at its frequency, never written', () => {
    // A chain of two transconductances: the solution is the product of the two gains. A stamper
    // added to the plan raises both gains to 1e200 at the second frequency only: the pivots stay
    // as they are (the gains sit off the diagonal, below it), the output voltage is 1e400.
    const circuit = loadNetlist(
      'resistor r1 a=in b=ground value=50 ohm\nresistor r2 a=out b=ground value=50 ohm\nresistor r3 a=o2 b=ground value=50 ohm\ntransconductance g1 p=out n=ground cp=in cn=ground gm=1 S\ntransconductance g2 p=o2 n=ground cp=out cn=ground gm=1 S\nport 1 plus=in\nport 2 plus=o2\nsweep list freqs=1 GHz, 2 GHz, 3 GHz\n',
      'numerics.sbx',
    ).circuit;
    const base = buildPlan(circuit);
    const slots: number[] = [];
    for (let s = 0; s < base.slotRow.length; s++) if (base.slotRow[s] !== base.slotCol[s]) slots.push(s);
    const stampers = [
      ...base.stampers,
      (omega: number, v: Float64Array) => {
        if (omega !== 2 * Math.PI * 2e9) return;
        for (const s of slots) v[2 * s] *= 1e200;
      },
    ];
    for (const solver of ['dense', 'sparse'] as const) {
      const plan = { ...base, stampers, stamperNames: [...base.stamperNames, 'probe'], symmetric: false };
      let caught: unknown;
      try {
        solveSweep(circuit, { plan, solver });
      } catch (e) {
        caught = e;
      }
      expect(caught).toBeInstanceOf(SingularSystemError); // NonFiniteResultError, or singular to working precision
      expect((caught as SingularSystemError).frequency).toBe(2e9);
      expect((caught as Error).message).toMatch(/at 2 GHz/);
    }
  });
});

describe('small reflections keep their relative accuracy', () => {
  // The reproducer of issue 14: a 1e-6 ohm series resistor between two 50 ohm ports gave
  // S11 = 7.8e-9 instead of 1.0e-8, with no warning.
  for (const solver of ['dense', 'sparse'] as const) {
    it(`1e-6 ohm in series between 50 ohm ports: S11 = R/(R + 2·Z0) to 1e-12 relative, no warning (${solver}) [SERIES]`, () => {
      const warnings: string[] = [];
      const net = solveSweep(loadNetlist('resistor r a=in b=out value=1e-6 ohm\nport 1 plus=in\nport 2 plus=out\nsweep list freqs=1 GHz, 2 GHz\n', 'numerics.sbx').circuit, {
        solver,
        onWarning: (m) => warnings.push(m),
      });
      const r = 1e-6;
      for (let k = 0; k < 2; k++) {
        const v = net.values.subarray(8 * k);
        expect(Math.abs(v[0]! - r / (r + 100)) / (r / (r + 100))).toBeLessThan(1e-12); // S11
        expect(Math.abs(v[6]! - r / (r + 100)) / (r / (r + 100))).toBeLessThan(1e-12); // S22
        expect(Math.abs(v[4]! - 100 / (r + 100))).toBeLessThan(1e-15); // S21
        expect(Math.abs(v[1]!)).toBeLessThan(1e-25);
      }
      expect(warnings).toEqual([]);
    });
  }

  it('a small series resistor before a matched lossless line (sparse system with a per-element stamp): S11 = R/(R + 2·Z0) to 1e-12 [SERIES]', () => {
    const net = solve('resistor r a=in b=x value=1e-6 ohm\nline t a=x b=out z0=50 ohm theta=73 deg at 1 GHz\nresistor rl a=out b=ground value=1e9 ohm\nport 1 plus=in\nport 2 plus=out\nsweep list freqs=1 GHz\n');
    // the 1e9 ohm shunt at port 2 adds the load 50 || 1e9 ohm; the lossless line moves its tiny
    // mismatch around the Smith chart, so the check is on the series part: |S11 − R/(R + 2Z0)| is
    // at most |Γ_load| = 50/(2e9 + 50) (both small; common practice: reflections add to first order)
    const r = 1e-6;
    const gl = 50 / (2e9 + 50);
    expect(Math.abs(Math.hypot(net.values[0]!, net.values[1]!) - r / (r + 100))).toBeLessThan(gl * 1.0001);
    // without the shunt: S11 = R/(R + 2·Z0) up to the rounding of the line's own coefficients
    // (e^(−jθ)·Z0/zs rounded: a mismatch of a few ε, so an absolute tolerance of 1e-15 — against
    // the 2e-9 of an unrefined solve)
    for (const solver of ['dense', 'sparse'] as const) {
      const exact = solveSweep(
        loadNetlist('resistor r a=in b=x value=1e-6 ohm\nline t a=x b=out z0=50 ohm theta=73 deg at 1 GHz\nport 1 plus=in\nport 2 plus=out\nsweep list freqs=1 GHz\n', 'numerics.sbx').circuit,
        { solver },
      );
      expect(Math.abs(exact.values[0]! - r / (r + 100))).toBeLessThan(1e-15);
      expect(Math.abs(exact.values[1]!)).toBeLessThan(1e-15);
    }
  });

  it('a 1e12 ohm shunt across a through line between 50 ohm ports: S11 = −Z0/(2R + Z0) to 1e-12 relative [SERIES, dual form for a shunt]', () => {
    const net = solve('resistor r a=in b=ground value=1e12 ohm\nport 1 plus=in\nport 2 plus=in\nsweep list freqs=1 GHz\n');
    const s11 = -50 / (2e12 + 50);
    expect(Math.abs(net.values[0]! - s11) / Math.abs(s11)).toBeLessThan(1e-12);
    expect(Math.abs(net.values[6]! - s11) / Math.abs(s11)).toBeLessThan(1e-12);
  });

  it('random series resistors and equal references, S11 from 1e-9 to 1e-2: S11 = R/(R + 2·Z0) to 1e-11 relative (fast-check, seed 1402) [SERIES]', () => {
    // (the double-double residual leaves a relative error of about (ε/S11)²: 1e-13 at S11 = 1e-9)
    fc.assert(
      fc.property(fc.double({ min: -9, max: -2, noNaN: true }), fc.double({ min: 1, max: 1000, noNaN: true }), fc.constantFrom('dense', 'sparse'), (lg, z0, solver) => {
        const r = 2 * z0 * Math.pow(10, lg);
        const net = solveSweep(
          loadNetlist(`resistor r a=in b=out value=${r} ohm\nport 1 plus=in ref=${z0} ohm\nport 2 plus=out ref=${z0} ohm\nsweep list freqs=1 GHz\n`, 'numerics.sbx').circuit,
          { solver: solver as 'dense' | 'sparse' },
        );
        const want = r / (r + 2 * z0);
        return Math.abs(net.values[0]! - want) / want < 1e-11 && Math.abs(net.values[6]! - want) / want < 1e-11;
      }),
      { seed: 1402, numRuns: 120 },
    );
  });

  it('where even refinement cannot keep the digits (1e-11 ohm between 50 ohm ports), the warning says how many are left', () => {
    const warnings: string[] = [];
    solve('resistor r a=in b=out value=1e-11 ohm\nport 1 plus=in\nport 2 plus=out\nsweep list freqs=1 GHz\n', (m) => warnings.push(m));
    expect(warnings.length).toBe(1);
    expect(warnings[0]).toMatch(/nearly singular at 1 GHz .*lost about 1[0-9] of their 16 significant digits; S(11|22) .* keeps only about [0-9] certain significant digits/);
  });

  it('a warning on a nearly singular system states the digits at risk, log10 of the condition number (common practice)', () => {
    const warnings: string[] = [];
    solve('resistor r1 a=in b=ground value=50 ohm\nresistor rx a=in b=mid value=1e13 ohm\nresistor rl a=mid b=ground value=1e13 ohm\nport 1 plus=in\nsweep list freqs=1 MHz\n', (m) => warnings.push(m));
    // reciprocal condition about 5e-12: about 11 digits at risk
    expect(warnings[0]).toMatch(/lost about 11 of their 16 significant digits/);
  });
});

describe('no digits warning for a reflection that is zero for every practical purpose', () => {
  it('a matched line with 200 dB of loss: S11 below −300 dB, S21 = e^(−γl) (Pozar, matched line), and no warning', () => {
    const warnings: string[] = [];
    const net = solve('line t a=in b=out z0=50 ohm length=1 m alpha_c=200 dB/m at 1 GHz\nport 1 plus=in\nport 2 plus=out\nsweep list freqs=1 GHz\n', (m) => warnings.push(m));
    expect(Math.hypot(net.values[0]!, net.values[1]!)).toBeLessThan(1e-15);
    expect(20 * Math.log10(Math.hypot(net.values[4]!, net.values[5]!))).toBeCloseTo(-200, 9);
    expect(warnings).toEqual([]);
  });
});
