// The report's trace palette (src/report/style.ts) is distinct for people with normal colour vision
// and with the two common red–green deficiencies. Everything below is written out here from its
// published definition, not taken from the code under test:
//
// - sRGB to linear RGB and linear RGB to CIE XYZ (D65): IEC 61966-2-1:1999 (sRGB), the matrix and
//   the transfer function (from memory);
// - XYZ to CIELAB with the D65 white (Xn, Yn, Zn) = (0.95047, 1, 1.08883): CIE 15:2004 (from memory);
// - CIEDE2000: G. Sharma, W. Wu and E. N. Dalal, "The CIEDE2000 color-difference formula:
//   implementation notes, supplementary test data, and mathematical observations", Color Research
//   and Application 30(1), 2005; checked below on pairs of their published test data (from memory);
// - deuteranopia and protanopia: the severity-1 matrices of G. M. Machado, M. M. Oliveira and
//   L. A. F. Fernandes, "A physiologically-based model for simulation of color vision deficiency",
//   IEEE TVCG 15(6), 2009 (from memory), applied to linear RGB and clipped to [0, 1].
import { describe, expect, it } from 'vitest';
import { COLORS, PALETTE } from '../src/report/style.js';
import { renderReport } from '../src/report/index.js';
import type { NetworkData } from '../src/network/types.js';

type Lab = [number, number, number];
type M3 = [[number, number, number], [number, number, number], [number, number, number]];

const IDENTITY: M3 = [
  [1, 0, 0],
  [0, 1, 0],
  [0, 0, 1],
];
// Machado, Oliveira & Fernandes (2009), severity 1.0 (from memory); each row sums to 1 (checked below)
const DEUTERANOPIA: M3 = [
  [0.367322, 0.860646, -0.227968],
  [0.280085, 0.672501, 0.047413],
  [-0.01182, 0.04294, 0.968881],
];
const PROTANOPIA: M3 = [
  [0.152286, 1.052583, -0.204868],
  [0.114503, 0.786281, 0.099216],
  [-0.003882, -0.048116, 1.051998],
];
const VISIONS: [string, M3][] = [
  ['normal vision', IDENTITY],
  ['deuteranopia', DEUTERANOPIA],
  ['protanopia', PROTANOPIA],
];

function rgbOf(hex: string): [number, number, number] {
  expect(hex).toMatch(/^#[0-9a-f]{6}$/i);
  return [1, 3, 5].map((p) => parseInt(hex.slice(p, p + 2), 16)) as [number, number, number];
}
/** sRGB electro-optical transfer function (IEC 61966-2-1). */
function linear(c8: number): number {
  const c = c8 / 255;
  return c <= 0.04045 ? c / 12.92 : Math.pow((c + 0.055) / 1.055, 2.4);
}
/** CIELAB (D65) of a colour seen through a colour-vision matrix applied in linear RGB. */
function labOf(hex: string, vision: M3): Lab {
  return labOfLinear(rgbOf(hex).map(linear), vision);
}
/** CIELAB (D65) of a linear-RGB colour seen through a colour-vision matrix. */
function labOfLinear(l: number[], vision: M3): Lab {
  const [r, g, b] = vision.map((row) => Math.min(1, Math.max(0, row[0] * l[0]! + row[1] * l[1]! + row[2] * l[2]!))) as [number, number, number];
  const X = 0.4124564 * r + 0.3575761 * g + 0.1804375 * b;
  const Y = 0.2126729 * r + 0.7151522 * g + 0.072175 * b;
  const Z = 0.0193339 * r + 0.119192 * g + 0.9503041 * b;
  const f = (t: number) => (t > 216 / 24389 ? Math.cbrt(t) : ((24389 / 27) * t + 16) / 116);
  const fx = f(X / 0.95047);
  const fy = f(Y);
  const fz = f(Z / 1.08883);
  return [116 * fy - 16, 500 * (fx - fy), 200 * (fy - fz)];
}

/** CIEDE2000 colour difference (Sharma, Wu & Dalal 2005, eqs. 1–22), kL = kC = kH = 1. */
function ciede2000([L1, a1, b1]: Lab, [L2, a2, b2]: Lab): number {
  const rad = Math.PI / 180;
  const C1 = Math.hypot(a1, b1);
  const C2 = Math.hypot(a2, b2);
  const Cm = (C1 + C2) / 2;
  const G = 0.5 * (1 - Math.sqrt(Cm ** 7 / (Cm ** 7 + 25 ** 7)));
  const a1p = (1 + G) * a1;
  const a2p = (1 + G) * a2;
  const C1p = Math.hypot(a1p, b1);
  const C2p = Math.hypot(a2p, b2);
  const hue = (a: number, b: number) => (a === 0 && b === 0 ? 0 : (Math.atan2(b, a) / rad + 360) % 360);
  const h1p = hue(a1p, b1);
  const h2p = hue(a2p, b2);
  const dLp = L2 - L1;
  const dCp = C2p - C1p;
  let dhp = 0;
  if (C1p * C2p !== 0) {
    dhp = h2p - h1p;
    if (dhp > 180) dhp -= 360;
    else if (dhp < -180) dhp += 360;
  }
  const dHp = 2 * Math.sqrt(C1p * C2p) * Math.sin((dhp * rad) / 2);
  const Lmp = (L1 + L2) / 2;
  const Cmp = (C1p + C2p) / 2;
  let hmp = h1p + h2p;
  if (C1p * C2p !== 0) {
    if (Math.abs(h1p - h2p) <= 180) hmp = (h1p + h2p) / 2;
    else hmp = h1p + h2p < 360 ? (h1p + h2p + 360) / 2 : (h1p + h2p - 360) / 2;
  }
  const T = 1 - 0.17 * Math.cos((hmp - 30) * rad) + 0.24 * Math.cos(2 * hmp * rad) + 0.32 * Math.cos((3 * hmp + 6) * rad) - 0.2 * Math.cos((4 * hmp - 63) * rad);
  const dTheta = 30 * Math.exp(-(((hmp - 275) / 25) ** 2));
  const RC = 2 * Math.sqrt(Cmp ** 7 / (Cmp ** 7 + 25 ** 7));
  const SL = 1 + (0.015 * (Lmp - 50) ** 2) / Math.sqrt(20 + (Lmp - 50) ** 2);
  const SC = 1 + 0.045 * Cmp;
  const SH = 1 + 0.015 * Cmp * T;
  const RT = -Math.sin(2 * dTheta * rad) * RC;
  return Math.sqrt((dLp / SL) ** 2 + (dCp / SC) ** 2 + (dHp / SH) ** 2 + RT * (dCp / SC) * (dHp / SH));
}

/** The smallest difference any two of the palette's colours must keep, in CIEDE2000 units. */
const MIN_DE00 = 15;

describe('the colour science used by the palette test', () => {
  it('CIEDE2000 matches Sharma, Wu & Dalal (2005) test pairs to 1e-4', () => {
    // pairs 1, 2, 7, 17 and 25 of their Table 1 (from memory): Lab 1, Lab 2, ΔE00
    const pairs: [Lab, Lab, number][] = [
      [[50, 2.6772, -79.7751], [50, 0, -82.7485], 2.0425],
      [[50, 3.1571, -77.2803], [50, 0, -82.7485], 2.8615],
      [[50, 0, 0], [50, -1, 2], 2.3669],
      [[50, 2.5, 0], [73, 25, -18], 27.1492],
      [[60.2574, -34.0099, 36.2677], [60.4626, -34.1751, 39.4387], 1.2644],
    ];
    for (const [a, b, want] of pairs) {
      expect(Math.abs(ciede2000(a, b) - want)).toBeLessThanOrEqual(1e-4);
      expect(Math.abs(ciede2000(b, a) - want)).toBeLessThanOrEqual(1e-4);
    }
  });

  it('sRGB white is L* = 100, a* = b* = 0, and black L* = 0 (CIE 15, to 1e-3)', () => {
    const w = labOf('#ffffff', IDENTITY);
    expect(Math.abs(w[0] - 100)).toBeLessThan(1e-3);
    expect(Math.abs(w[1])).toBeLessThan(1e-3);
    expect(Math.abs(w[2])).toBeLessThan(1e-3);
    expect(labOf('#000000', IDENTITY)[0]).toBe(0);
  });

  it('the deficiency matrices keep greys grey and merge colours along their confusion line', () => {
    for (const [name, m] of VISIONS) for (const row of m) expect(Math.abs(row[0] + row[1] + row[2] - 1), name).toBeLessThan(1e-5);
    for (const [name, m] of VISIONS.slice(1)) {
      // a dichromat's colour space has two dimensions: the simulation is a projection of rank 2
      const det =
        m[0][0] * (m[1][1] * m[2][2] - m[1][2] * m[2][1]) - m[0][1] * (m[1][0] * m[2][2] - m[1][2] * m[2][0]) + m[0][2] * (m[1][0] * m[2][1] - m[1][1] * m[2][0]);
      expect(Math.abs(det), name).toBeLessThan(1e-5);
      // two colours that differ along the null direction (the confusion line) look the same to a
      // dichromat and clearly different to everyone else
      const v = [m[0][1] * m[1][2] - m[0][2] * m[1][1], m[0][2] * m[1][0] - m[0][0] * m[1][2], m[0][0] * m[1][1] - m[0][1] * m[1][0]];
      const size = Math.max(...v.map(Math.abs));
      const a = [0.3, 0.3, 0.3].map((x, q) => x - (0.15 * v[q]!) / size);
      const b = [0.3, 0.3, 0.3].map((x, q) => x + (0.15 * v[q]!) / size);
      expect(ciede2000(labOfLinear(a, IDENTITY), labOfLinear(b, IDENTITY)), name).toBeGreaterThan(10);
      expect(ciede2000(labOfLinear(a, m), labOfLinear(b, m)), name).toBeLessThan(1);
    }
    // and a plain red and green, far apart with normal vision, come close for a deuteranope
    const normal = ciede2000(labOf('#d03020', IDENTITY), labOf('#50a040', IDENTITY));
    expect(ciede2000(labOf('#d03020', DEUTERANOPIA), labOf('#50a040', DEUTERANOPIA))).toBeLessThan(normal / 4);
  });
});

describe('the trace palette', () => {
  it('has eight distinct colours, none a grey, none too light to read on white', () => {
    expect(PALETTE.length).toBe(8);
    expect(new Set(PALETTE.map((c) => c.toLowerCase())).size).toBe(PALETTE.length);
    for (const c of PALETTE) {
      const [L, a, b] = labOf(c, IDENTITY);
      expect(L, c).toBeGreaterThanOrEqual(25);
      expect(L, c).toBeLessThanOrEqual(70);
      expect(Math.hypot(a, b), c).toBeGreaterThanOrEqual(30); // chroma: no grey
    }
  });

  it(`every pair is at least ${MIN_DE00} CIEDE2000 apart with normal vision, deuteranopia and protanopia`, () => {
    const worst: string[] = [];
    for (const [name, m] of VISIONS) {
      for (let p = 0; p < PALETTE.length; p++) {
        for (let q = p + 1; q < PALETTE.length; q++) {
          const d = ciede2000(labOf(PALETTE[p]!, m), labOf(PALETTE[q]!, m));
          if (!(d >= MIN_DE00)) worst.push(`${name}: ${PALETTE[p]} and ${PALETTE[q]} only ${d.toFixed(2)} apart`);
        }
      }
    }
    expect(worst).toEqual([]);
  });

  it(`every colour is at least ${MIN_DE00} CIEDE2000 from the fail red, the limit ink, the accent and the page, in all three visions`, () => {
    const worst: string[] = [];
    for (const [name, m] of VISIONS) {
      for (const c of PALETTE) {
        for (const [what, other] of [
          ['fail', COLORS.fail],
          ['limit', COLORS.limit],
          ['accent', COLORS.accent],
          ['page', '#ffffff'],
        ] as const) {
          const d = ciede2000(labOf(c, m), labOf(other, m));
          if (!(d >= MIN_DE00)) worst.push(`${name}: ${c} and the ${what} colour ${other} only ${d.toFixed(2)} apart`);
        }
      }
    }
    expect(worst).toEqual([]);
  });

  it('the report gives its traces the palette colours, in order', () => {
    // a 2-port with four different entries, so none is merged with another
    const values = new Float64Array(8);
    values.set([0.1, 0, 0.5, 0.1, 0.7, 0.2, 0.3, -0.1]);
    const net: NetworkData = { parameter: 'S', ports: 2, frequencies: Float64Array.of(1e9), references: Float64Array.of(50, 50), values };
    const html = renderReport({ source: 'x', net });
    const data = JSON.parse(/<script type="application\/json" id="sbx-data">([\s\S]*?)<\/script>/.exec(html)![1]!) as { entries: { color: string }[] };
    expect(data.entries.map((e) => e.color)).toEqual(PALETTE.slice(0, 4));
  });
});
