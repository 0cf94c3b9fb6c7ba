/**
 * Matching networks (`scatterbox design match`): L sections (both forms), Π and T for a loaded
 * Q, a single shunt stub, a quarter-wave transformer, and multi-section binomial and Chebyshev
 * transformers. The netlist is a one-port: port 1 (the source, --z0) sees the network and the
 * load, which is written as a resistor with a series inductor or capacitor giving its reactance
 * at the match frequency.
 *
 * Closed forms (common practice; Pozar, Microwave Engineering, ch. 5): the L section's
 * X = ±√(RL·(Z0 − RL)) − XL, B = ±√((Z0 − RL)/RL)/Z0 (RL < Z0) and
 * B = (XL ± √(RL/Z0)·√(RL² + XL² − Z0·RL))/(RL² + XL²), X = 1/B + XL·Z0/RL − Z0/(B·RL) (RL > Z0);
 * the Π and T as two L sections back to back through a virtual resistance
 * R = max(R1,R2)/(Q²+1) (Π) or min(R1,R2)·(Q²+1) (T); the shunt stub's position
 * t = tan(βd) = (XL ± √(RL·((Z0 − RL)² + XL²)/Z0))/(RL − Z0); the binomial transformer's
 * ln(Z(n+1)/Z(n)) = 2^−N·C(N,n)·ln(RL/Z0); the Chebyshev transformer's reflections from
 * A·T_N(sec θm·cos θ) (small-reflection theory).
 *
 * @module
 */
import type { SeriesName } from '../design/series.js';
import { formatFrequency } from '../format/frequency.js';
import { DesignRequestError } from './lumped.js';
import { chebyshevT } from './prototype.js';
import { columns, comment, quantity, short, snap, variableText } from './netlist.js';
import { choiceOption, frequencyList, frequencyOption, numberOption, resistanceOption, seriesOption, wholeOption, MAX_DESIGN_IMPEDANCE, MIN_DESIGN_IMPEDANCE, type RawOptions } from './options.js';
import { evaluateQuantity } from '../load.js';
import { loadNetworkFile } from '../io/read.js';
import { convertNetwork } from '../network/convert.js';
import { cdiv, type Cx } from './poly.js';
import { dirname, relative, resolve } from 'node:path';

export const MATCH_NETWORKS = ['l-lowpass', 'l-highpass', 'pi', 'tee', 'stub', 'double-stub', 'quarter-wave', 'binomial', 'chebyshev'] as const;
export type MatchNetwork = (typeof MATCH_NETWORKS)[number];

export interface MatchRequest {
  network: MatchNetwork;
  f0: number;
  z0: number;
  /** The load R + jX, ohm. */
  r: number;
  x: number;
  loadedQ?: number;
  sections?: number;
  /** Absolute bandwidth of a multi-section transformer, Hz. */
  bandwidth?: number;
  stub: 'open' | 'short';
  series?: SeriesName;
  q?: number;
  /** A one-port data file (Touchstone or JSON) holding the load over a band, and that band (Hz). */
  loadFile?: string;
  band?: [number, number];
  /** With a load file: the return loss asked for over the band, dB (default 10). */
  minReturnLoss?: number;
}

export interface MatchDesign {
  request: MatchRequest;
  text: string;
  summary: string;
  /** Line impedances of the transformer sections (ohm), source side first. */
  sections?: number[];
  /** The largest reflection of a multi-section transformer in its band (small-reflection theory). */
  gammaMax?: number;
  /** The same, from the sections' chain matrices (exact for ideal lines), over 2001 points of the band. */
  exactMax?: number;
}

/**
 * A complex impedance as typed: `30+20j`, `30 - j20 ohm`, `75 ohm`, `30+20j ohm`. The parts are
 * plain numbers (ohm); a unit at the end may be `ohm`.
 */
export function readImpedance(text: string, option: string): { r: number; x: number } {
  const t = text.trim().replace(/\s*(ohms?|Ω|Ω)$/, '').replace(/\s+/g, '');
  const num = '(?:\\d+\\.?\\d*|\\.\\d+)(?:[eE][+-]?\\d+)?';
  const m = new RegExp(`^([+-]?${num})?(?:([+-])(?:j(${num})|(${num})j))?$`).exec(t);
  if (!m || (m[1] === undefined && m[2] === undefined) || t === '') {
    // a plain resistance with any unit the netlist knows (`1.2 kohm`)
    try {
      return { r: evaluateQuantity(text, 'ohm', `--${option}`), x: 0 };
    } catch {
      throw new DesignRequestError(`--${option} is an impedance such as "75 ohm", "30+20j" or "30-j20 ohm", not ${JSON.stringify(text)}`);
    }
  }
  const r = m[1] === undefined ? 0 : Number(m[1]);
  const mag = m[3] ?? m[4];
  const x = mag === undefined ? 0 : (m[2] === '-' ? -1 : 1) * Number(mag);
  return { r, x };
}

export function readMatchRequest(raw: RawOptions): MatchRequest {
  const network = choiceOption<MatchNetwork>(raw, 'network', 'network', MATCH_NETWORKS, 'l-lowpass');
  if (raw.loadFile !== undefined && raw.loadFile !== null) return readFileMatch(raw, network);
  if (raw.band !== undefined || raw.minReturnLoss !== undefined) throw new DesignRequestError('--band and --min-return-loss belong to a load read from a file (--load-file)');
  const f0 = frequencyOption(raw, 'freq', 'freq');
  if (f0 === undefined) throw new DesignRequestError('a match needs --freq (the frequency to match at)');
  const loadText = raw.load;
  if (loadText === undefined || loadText === null || typeof loadText === 'boolean') throw new DesignRequestError('a match needs --load (the load impedance, e.g. "30+20j ohm")');
  if (Array.isArray(loadText)) throw new DesignRequestError('--load is given more than once');
  const { r, x } = readImpedance(String(loadText), 'load');
  if (!(r >= MIN_DESIGN_IMPEDANCE && r <= MAX_DESIGN_IMPEDANCE)) throw new DesignRequestError(`the resistance of --load must be from ${MIN_DESIGN_IMPEDANCE} ohm to ${MAX_DESIGN_IMPEDANCE} ohm, not ${r} ohm`);
  if (!(Math.abs(x) <= MAX_DESIGN_IMPEDANCE)) throw new DesignRequestError(`the reactance of --load must be within ±${MAX_DESIGN_IMPEDANCE} ohm, not ${x} ohm`);
  return { network, f0, r, x, ...commonOptions(raw) };
}

/** The options common to every match (network choices, z0, Q, series…), after the load. */
function commonOptions(raw: RawOptions) {
  for (const k of ['response', 'order', 'ripple', 'stopAtten', 'stopEdge', 'cutoff', 'center', 'first', 'realize']) {
    if (raw[k] !== undefined) throw new DesignRequestError(`--${k.replace(/[A-Z]/g, (c) => `-${c.toLowerCase()}`)} belongs to the filters, not to a match`);
  }
  return {
    z0: resistanceOption(raw, 'z0', 'z0') ?? 50,
    loadedQ: numberOption(raw, 'loadedQ', 'loaded-q', 0.01, 1000),
    sections: wholeOption(raw, 'sections', 'sections', 1, 8),
    bandwidth: frequencyOption(raw, 'bandwidth', 'bandwidth'),
    stub: choiceOption(raw, 'stub', 'stub', ['open', 'short'] as const, 'open'),
    series: seriesOption(raw),
    q: numberOption(raw, 'q', 'q', 1, 1e6),
  };
}

/**
 * A match to a load read from a one-port data file: matched at --freq (default the geometric
 * centre of --band), the load taken from the file there (S11 interpolated linearly in its real
 * and imaginary parts, as the `datafile` element does), and checked over --band.
 */
function readFileMatch(raw: RawOptions, network: MatchNetwork): MatchRequest {
  if (raw.load !== undefined) throw new DesignRequestError('give --load or --load-file, not both');
  const path = raw.loadFile;
  if (Array.isArray(path)) throw new DesignRequestError('--load-file is given more than once');
  if (typeof path !== 'string' || path.trim() === '') throw new DesignRequestError('--load-file needs the path of a one-port data file (.s1p or .json)');
  const band = frequencyList(raw, 'band', 'band');
  if (band.length !== 2 || !(band[0]! < band[1]!)) throw new DesignRequestError('--load-file needs --band with two frequencies, low first, e.g. "2.4 GHz, 2.5 GHz"');
  const f0 = frequencyOption(raw, 'freq', 'freq') ?? Math.sqrt(band[0]! * band[1]!);
  if (f0 < band[0]! || f0 > band[1]!) throw new DesignRequestError(`--freq (${formatFrequency(f0)}) must lie within --band`);
  const { net } = loadNetworkFile(path);
  if (net.ports !== 1) throw new DesignRequestError(`--load-file must hold a one-port (a load), but ${path} has ${net.ports} ports`);
  const s = net.parameter === 'S' ? net : convertNetwork(net, 'S');
  const f = s.frequencies;
  if (band[0]! < f[0]! * (1 - 1e-9) || band[1]! > f[f.length - 1]! * (1 + 1e-9)) {
    throw new DesignRequestError(`--band (${formatFrequency(band[0]!)} to ${formatFrequency(band[1]!)}) reaches outside the data of ${path} (${formatFrequency(f[0]!)} to ${formatFrequency(f[f.length - 1]!)})`);
  }
  let k = 0;
  while (k < f.length - 2 && f[k + 1]! < f0) k++;
  const t = f.length === 1 ? 0 : Math.min(1, Math.max(0, (f0 - f[k]!) / (f[k + 1]! - f[k]!)));
  const at = (i: number) => [s.values[2 * i]!, s.values[2 * i + 1]!] as const;
  const a = at(k);
  const b = f.length === 1 ? a : at(k + 1);
  const g: Cx = [a[0] + t * (b[0] - a[0]), a[1] + t * (b[1] - a[1])];
  const ref = s.references[0]!;
  // Z = R·(1 + Γ)/(1 − Γ)
  const z = cdiv([ref * (1 + g[0]), ref * g[1]], [1 - g[0], -g[1]]);
  if (!(z[0] > 0) || !Number.isFinite(z[1])) throw new DesignRequestError(`the load in ${path} at ${formatFrequency(f0)} has no positive resistance (Z = ${short(z[0])} ${z[1] < 0 ? '−' : '+'} j${short(Math.abs(z[1]))} ohm): nothing passive matches it`);
  return {
    network,
    f0,
    r: z[0],
    x: z[1],
    ...commonOptions(raw),
    loadFile: path,
    band: [band[0]!, band[1]!],
    minReturnLoss: numberOption(raw, 'minReturnLoss', 'min-return-loss', 0, 60, 'dB') ?? 10,
  };
}

/** Binomial transformer impedances Z1…ZN (ohm), source side first. */
export function binomialSections(z0: number, rl: number, n: number): number[] {
  const out: number[] = [];
  let ln = Math.log(z0);
  const choose = (k: number) => {
    let c = 1;
    for (let i = 1; i <= k; i++) c = (c * (n - i + 1)) / i;
    return c;
  };
  for (let k = 0; k < n; k++) {
    ln += 2 ** -n * choose(k) * Math.log(rl / z0);
    out.push(Math.exp(ln));
  }
  return out;
}

/**
 * Chebyshev transformer impedances (ohm), source side first, and the largest reflection in the
 * band: from the fractional bandwidth (Δf/f0) or from the largest reflection Γm itself.
 */
export function chebyshevSections(z0: number, rl: number, n: number, spec: { fractionalBandwidth: number } | { gammaMax: number }): { z: number[]; gammaMax: number; secThetaM: number } {
  const half = Math.log(rl / z0) / 2; // Γ(θ = 0) in the small-reflection approximation, ½·ln(RL/Z0)
  let sec: number;
  if ('gammaMax' in spec) sec = Math.cosh(Math.acosh(Math.abs(half / spec.gammaMax)) / n);
  else {
    // Δf/f0 = 2 − 4θm/π
    const thetaM = (Math.PI / 2) * (1 - spec.fractionalBandwidth / 2);
    sec = 1 / Math.cos(thetaM);
  }
  const a = half / chebyshevT(n, sec);
  // cos-series coefficients of A·T_N(sec·cos θ) (a trigonometric polynomial of degree N), by a DFT
  const M = 64;
  const c = new Array<number>(n + 1).fill(0);
  for (let k = 0; k <= n; k++) {
    let s = 0;
    for (let j = 0; j < M; j++) {
      const th = (2 * Math.PI * j) / M;
      s += a * chebyshevT(n, sec * Math.cos(th)) * Math.cos(k * th);
    }
    c[k] = ((k === 0 ? 1 : 2) * s) / M;
  }
  // 2·[Γ0·cos Nθ + Γ1·cos (N−2)θ + …] (the middle term of an even N not doubled)
  const gam: number[] = [];
  for (let i = 0; i <= n; i++) {
    const k = Math.abs(n - 2 * i);
    gam.push(k === 0 ? c[0]! : c[k]! / 2);
  }
  const z: number[] = [];
  let ln = Math.log(z0);
  for (let i = 0; i < n; i++) {
    ln += 2 * gam[i]!;
    z.push(Math.exp(ln));
  }
  return { z, gammaMax: Math.abs(a), secThetaM: sec };
}

interface Piece {
  /** Element lines (netlist) and variables. */
  lets: string[];
  elements: string[];
  rows: string[][];
}

/**
 * Designs a match and writes its netlist. `netlistPath` is where the netlist will be written: a
 * load file is named relative to it.
 */
export function designMatch(m: MatchRequest, netlistPath = 'design.sbx'): MatchDesign {
  const { f0, z0, r: rl, x: xl } = m;
  const w0 = 2 * Math.PI * f0;
  const complexLoad = Math.abs(xl) > 1e-12 * rl;
  if (Math.abs(rl - z0) <= 1e-9 * z0 && !complexLoad) throw new DesignRequestError('--load already equals --z0: there is nothing to match');
  const needsReal = ['pi', 'tee', 'quarter-wave', 'binomial', 'chebyshev'].includes(m.network);
  if (needsReal && complexLoad) throw new DesignRequestError(`--network ${m.network} takes a resistive --load, but this one has a reactance of ${short(xl)} ohm: use --network l-lowpass, l-highpass or stub (or cancel the reactance first)`);
  if (m.loadedQ !== undefined && m.network !== 'pi' && m.network !== 'tee') throw new DesignRequestError('--loaded-q belongs to --network pi or tee');
  if (m.sections !== undefined && m.network !== 'binomial' && m.network !== 'chebyshev') throw new DesignRequestError('--sections belongs to --network binomial or chebyshev');
  if (m.bandwidth !== undefined && !['binomial', 'chebyshev'].includes(m.network)) throw new DesignRequestError('--bandwidth of a match belongs to --network binomial or chebyshev');
  if (m.bandwidth !== undefined && !(m.bandwidth < 2 * f0)) throw new DesignRequestError(`--bandwidth (${formatFrequency(m.bandwidth)}) must be below twice --freq (${formatFrequency(f0)})`);
  const lumped = ['l-lowpass', 'l-highpass', 'pi', 'tee'].includes(m.network);
  if (m.stub !== 'open' && m.network !== 'stub' && m.network !== 'double-stub') throw new DesignRequestError('--stub belongs to --network stub or double-stub');
  if (!lumped && (m.series !== undefined || m.q !== undefined)) throw new DesignRequestError(`--series and --q apply to lumped parts; --network ${m.network} is made of lines`);

  const piece: Piece = { lets: [], elements: [], rows: [] };
  const qText = m.q !== undefined ? ` q=${short(m.q, 8)} at f0` : '';
  /** A reactance X (ohm, at f0) between a and b: an inductor for X > 0, a capacitor for X < 0. */
  const reactance = (name: string, x: number, a: string, b: string, role: string) => {
    if (Math.abs(x) <= 1e-12 * z0) return false;
    const kind = x > 0 ? 'inductor' : 'capacitor';
    const unit = x > 0 ? 'H' : 'F';
    const exact = x > 0 ? x / w0 : -1 / (w0 * x);
    const value = snap(exact, m.series);
    const id = `${kind === 'inductor' ? 'l' : 'c'}${name}`;
    piece.lets.push(`let ${id.padEnd(5)} = ${variableText(value, unit, m.series)}   # ${role}, X = ${short(x)} ohm at f0${value !== exact ? `; ${quantity(exact, unit, 6)} before snapping` : ''}`);
    piece.elements.push(`${kind.padEnd(9)} ${id.padEnd(5)} a=${a} b=${b} value=${id}${qText}`);
    piece.rows.push([id, role, quantity(value, unit, 6), ...(m.series ? [quantity(exact, unit, 6)] : [])]);
    return true;
  };
  const susceptance = (name: string, b: number, node: string, role: string) => (Math.abs(b) * z0 <= 1e-12 ? false : reactance(name, -1 / b, node, 'ground', role));

  let how = '';
  let sections: number[] | undefined;
  let gammaMax: number | undefined;
  let band: [number, number] | undefined;
  switch (m.network) {
    case 'l-lowpass':
    case 'l-highpass': {
      // the two solutions; the form is named after its shunt part (capacitor: low-pass form)
      const wantC = m.network === 'l-lowpass';
      if (rl > z0) {
        // shunt B at the load, series X toward the source
        const root = Math.sqrt(rl / z0) * Math.sqrt(rl * rl + xl * xl - z0 * rl);
        const sols = [1, -1].map((s) => {
          const b = (xl + s * root) / (rl * rl + xl * xl);
          return { b, x: 1 / b + (xl * z0) / rl - z0 / (b * rl) };
        });
        const sol = sols.find((s) => (s.b > 0) === wantC)!;
        reactance('1', sol.x, 'in', 'load', 'series, source side');
        susceptance('2', sol.b, 'load', 'shunt, load side');
        how = `L section, shunt part at the load (RL > Z0): B = (XL ± √(RL/Z0)·√(RL² + XL² − Z0·RL))/(RL² + XL²) = ${short(sol.b)} S, X = 1/B + XL·Z0/RL − Z0/(B·RL) = ${short(sol.x)} ohm.`;
      } else {
        // series X at the load, shunt B at the source
        const sols = [1, -1].map((s) => ({ x: s * Math.sqrt(rl * (z0 - rl)) - xl, b: (s * Math.sqrt((z0 - rl) / rl)) / z0 }));
        const sol = Math.abs(rl - z0) <= 1e-9 * z0 ? sols[0]! : sols.find((s) => (s.b > 0) === wantC)!;
        susceptance('1', sol.b, 'in', 'shunt, source side');
        reactance('2', sol.x, 'in', 'load', 'series, load side');
        how = `L section, shunt part at the source (RL < Z0): X = ±√(RL·(Z0 − RL)) − XL = ${short(sol.x)} ohm, B = ±√((Z0 − RL)/RL)/Z0 = ${short(sol.b)} S.`;
      }
      break;
    }
    case 'pi':
    case 'tee': {
      const hi = Math.max(z0, rl);
      const lo = Math.min(z0, rl);
      const qMin = Math.sqrt(hi / lo - 1);
      const q = m.loadedQ ?? Math.max(2 * qMin, 1);
      if (q < qMin * (1 + 1e-9)) throw new DesignRequestError(`--loaded-q ${short(q)} is below the least a ${m.network === 'pi' ? 'Π' : 'T'} can have for these resistances, √(Rhigh/Rlow − 1) = ${short(qMin)}`);
      if (m.network === 'pi') {
        const rv = hi / (q * q + 1);
        const q1 = Math.sqrt(z0 / rv - 1);
        const q2 = Math.sqrt(rl / rv - 1);
        susceptance('1', q1 / z0, 'in', 'shunt, source side');
        reactance('2', (q1 + q2) * rv, 'in', 'load', 'series');
        susceptance('3', q2 / rl, 'load', 'shunt, load side');
        how = `Π (low-pass form): two L sections back to back through the virtual resistance Rv = max(Z0, RL)/(Q² + 1) = ${short(rv)} ohm; each end has Qi = √(Ri/Rv − 1) (${short(q1)}, ${short(q2)}), shunt susceptance Qi/Ri, and the series arm the sum of Qi·Rv. Loaded Q ${short(q)}${m.loadedQ === undefined ? ' (twice the least, as none was given)' : ''}.`;
      } else {
        const rv = lo * (q * q + 1);
        const q1 = Math.sqrt(rv / z0 - 1);
        const q2 = Math.sqrt(rv / rl - 1);
        reactance('1', q1 * z0, 'in', 'mid', 'series, source side');
        susceptance('2', (q1 + q2) / rv, 'mid', 'shunt');
        reactance('3', q2 * rl, 'mid', 'load', 'series, load side');
        how = `T (low-pass form): two L sections back to back through the virtual resistance Rv = min(Z0, RL)·(Q² + 1) = ${short(rv)} ohm; each end has Qi = √(Rv/Ri − 1) (${short(q1)}, ${short(q2)}), series reactance Qi·Ri, and the shunt arm the sum of Qi/Rv. Loaded Q ${short(q)}${m.loadedQ === undefined ? ' (twice the least, as none was given)' : ''}.`;
      }
      break;
    }
    case 'stub': {
      // shunt stub at `in`, then a line of θd to the load
      let t: number;
      if (Math.abs(rl - z0) <= 1e-9 * z0) t = -xl / (2 * z0);
      else t = (xl + Math.sqrt((rl * ((z0 - rl) ** 2 + xl * xl)) / z0)) / (rl - z0);
      const thd = Math.atan(t) < 0 ? Math.PI + Math.atan(t) : Math.atan(t);
      const b = (rl * rl * t - (z0 - xl * t) * (xl + z0 * t)) / (z0 * (rl * rl + (xl + z0 * t) ** 2));
      // the stub cancels B: open, tan θs = −B·Z0; short, cot θs = B·Z0
      let ths = m.stub === 'open' ? Math.atan(-b * z0) : Math.atan(1 / (b * z0));
      if (ths <= 0) ths += Math.PI;
      const deg = (x: number) => (x * 180) / Math.PI;
      piece.lets.push(`let thd  = ${quantity(deg(thd), 'deg')} vary ${quantity(deg(thd) / 2, 'deg', 6)} to ${quantity(Math.min(2 * deg(thd), 360), 'deg', 6)}   # line from the stub to the load, at f0`);
      piece.lets.push(`let ths  = ${quantity(deg(ths), 'deg')} vary ${quantity(deg(ths) / 2, 'deg', 6)} to ${quantity(Math.min(2 * deg(ths), 360), 'deg', 6)}   # ${m.stub} stub, at f0`);
      piece.elements.push(`${m.stub}_stub ts a=in z0=z0 theta=ths at f0`);
      piece.elements.push(`line ld a=in b=load z0=z0 theta=thd at f0`);
      piece.rows.push(['ts', `${m.stub} stub, shunt`, `${short(deg(ths))} deg`], ['ld', 'line to the load', `${short(deg(thd))} deg`]);
      how = `Single shunt ${m.stub} stub: the line to the load is θd = atan(t) (plus 180° for t < 0), t = (XL + √(RL·((Z0 − RL)² + XL²)/Z0))/(RL − Z0) = ${short(t)}; there the admittance is 1/Z0 + jB, B = ${short(b)} S, which the stub cancels (${m.stub === 'open' ? 'tan θs = −B·Z0' : 'cot θs = B·Z0'}).`;
      break;
    }
    case 'double-stub': {
      // stub 1 at the load, stub 2 an eighth of a wavelength (at f0) toward the source; t = tan(βd) = 1
      // (Pozar, Microwave Engineering, §5.3): B1 = −BL + (Y0 + √((1 + t²)·GL·Y0 − GL²·t²))/t,
      // B2 = (Y0·√(Y0·GL·(1 + t²) − GL²·t²) + GL·Y0)/(GL·t)
      const y0 = 1 / z0;
      const d = rl * rl + xl * xl;
      const gl = rl / d;
      const bl = -xl / d;
      const t = 1;
      const disc = (1 + t * t) * gl * y0 - gl * gl * t * t;
      if (!(disc >= 0)) throw new DesignRequestError(`--network double-stub cannot match this load with stubs an eighth of a wavelength apart: its conductance ${short(gl)} S is above (1 + t²)/t²·Y0 = ${short(2 * y0)} S (put a line before the first stub, or use --network stub)`);
      const b1 = -bl + (y0 + Math.sqrt(disc)) / t;
      const b2 = (y0 * Math.sqrt(disc) + gl * y0) / (gl * t);
      // stub 2 cancels the susceptance seen there: it supplies B2 in Pozar's sign convention, which is the negative of what remains
      const stubAngle = (b: number) => {
        let th = m.stub === 'open' ? Math.atan(b / y0) : Math.atan(-y0 / b);
        if (th <= 0) th += Math.PI;
        return th;
      };
      const th1 = stubAngle(b1);
      const th2 = stubAngle(b2);
      const deg = (x: number) => (x * 180) / Math.PI;
      piece.lets.push(`let th1  = ${quantity(deg(th1), 'deg')} vary ${quantity(deg(th1) / 2, 'deg', 6)} to ${quantity(Math.min(2 * deg(th1), 360), 'deg', 6)}   # stub at the load, B1 = ${short(b1)} S`);
      piece.lets.push(`let th2  = ${quantity(deg(th2), 'deg')} vary ${quantity(deg(th2) / 2, 'deg', 6)} to ${quantity(Math.min(2 * deg(th2), 360), 'deg', 6)}   # stub at the source end, B2 = ${short(b2)} S`);
      piece.elements.push(`${m.stub}_stub ts1 a=load z0=z0 theta=th1 at f0`);
      piece.elements.push(`line ld a=in b=load z0=z0 theta=45 deg at f0`);
      piece.elements.push(`${m.stub}_stub ts2 a=in z0=z0 theta=th2 at f0`);
      piece.rows.push(['ts1', `${m.stub} stub at the load`, `${short(deg(th1))} deg`], ['ld', 'line between the stubs', '45 deg'], ['ts2', `${m.stub} stub at the source end`, `${short(deg(th2))} deg`]);
      how = `Double ${m.stub}-stub tuner, stubs 45° apart at f0, the first at the load (Pozar, §5.3): B1 = −BL + (Y0 + √((1 + t²)·GL·Y0 − GL²·t²))/t = ${short(b1)} S, B2 = (Y0·√(Y0·GL·(1 + t²) − GL²·t²) + GL·Y0)/(GL·t) = ${short(b2)} S, t = tan 45° = 1.`;
      break;
    }
    case 'quarter-wave':
    case 'binomial':
    case 'chebyshev': {
      const n = m.network === 'quarter-wave' ? 1 : (m.sections ?? (m.network === 'binomial' ? 2 : 3));
      if (m.network === 'quarter-wave' && m.sections !== undefined) throw new DesignRequestError('--sections belongs to --network binomial or chebyshev');
      if (m.network === 'chebyshev') {
        if (m.bandwidth === undefined) throw new DesignRequestError('a Chebyshev transformer needs --bandwidth (the band its ripple spans)');
        const r = chebyshevSections(z0, rl, n, { fractionalBandwidth: m.bandwidth / f0 });
        sections = r.z;
        gammaMax = r.gammaMax;
        how = `Chebyshev transformer, ${n} quarter-wave sections (small-reflection theory): Γ(θ) = A·e^(−jNθ)·T_N(sec θm·cos θ), A = ½·ln(RL/Z0)/T_N(sec θm), sec θm = ${short(r.secThetaM)} from the bandwidth (Δf/f0 = 2 − 4θm/π); ln(Z(n+1)/Zn) = 2Γn. Largest reflection in the band about ${short(r.gammaMax, 4)}.`;
      } else {
        sections = binomialSections(z0, rl, n);
        const halfLn = Math.abs(Math.log(rl / z0) / 2);
        if (m.bandwidth !== undefined) {
          const thetaM = (Math.PI / 2) * (1 - m.bandwidth / f0 / 2);
          gammaMax = halfLn * Math.cos(thetaM) ** n;
        }
        how =
          n === 1
            ? `Quarter-wave transformer: Z1 = √(Z0·RL) = ${short(sections[0]!)} ohm.`
            : `Binomial (maximally flat) transformer, ${n} quarter-wave sections: ln(Z(n+1)/Zn) = 2^−N·C(N,n)·ln(RL/Z0) (small-reflection theory).${gammaMax !== undefined ? ` Largest reflection in the band about ${short(gammaMax, 4)}.` : ''}`;
      }
      let node = 'in';
      sections.forEach((z, i) => {
        const next = i === n - 1 ? 'load' : `t${i + 1}`;
        piece.lets.push(`let z${i + 1}   = ${quantity(z, 'ohm')} vary ${quantity(Math.max(z / 2, MIN_DESIGN_IMPEDANCE), 'ohm', 6)} to ${quantity(z * 2, 'ohm', 6)}   # section ${i + 1}`);
        piece.elements.push(`line t${i + 1} a=${node} b=${next} z0=z${i + 1} theta=90 deg at f0`);
        piece.rows.push([`t${i + 1}`, `quarter-wave section`, `${short(z, 6)} ohm`]);
        node = next;
      });
      if (m.bandwidth !== undefined) band = [f0 - m.bandwidth / 2, f0 + m.bandwidth / 2];
      break;
    }
  }

  // the netlist
  const loadText = `${short(rl)}${complexLoad ? ` ${xl > 0 ? '+' : '−'} j${short(Math.abs(xl))}` : ''} ohm`;
  const networkName: Record<MatchNetwork, string> = {
    'l-lowpass': 'L-section match (low-pass form)',
    'l-highpass': 'L-section match (high-pass form)',
    pi: 'Π match',
    tee: 'T match',
    stub: `single ${m.stub}-stub match`,
    'double-stub': `double ${m.stub}-stub match`,
    'quarter-wave': 'quarter-wave transformer',
    binomial: `${sections?.length ?? ''}-section binomial transformer`,
    chebyshev: `${sections?.length ?? ''}-section Chebyshev transformer`,
  };
  const title = `${networkName[m.network]} at ${formatFrequency(f0)}, ${short(z0)} ohm to ${loadText}`;
  const lines: string[] = [];
  lines.push(
    ...comment(
      [
        `${title}: written by \`scatterbox design match\`.`,
        how,
        '',
        m.loadFile !== undefined
          ? `Port 1 is the source (${short(z0)} ohm); the load is the data of ${m.loadFile}, ${loadText} at f0 (S11 interpolated linearly in its real and imaginary parts).`
          : `Port 1 is the source (${short(z0)} ohm); the load ${loadText} at f0 is written below as a resistor${complexLoad ? ` with a series ${xl > 0 ? 'inductor' : 'capacitor'} that gives its reactance at f0 (away from f0 a real load will differ)` : ''}.`,
        lumped
          ? `The part values are design variables, from half to twice the design value${m.series ? `, snapped to the ${m.series} series` : ', not rounded'}. ${m.q !== undefined ? `Every part has Q = ${short(m.q)} at f0.` : 'Parts are ideal (lossless).'}`
          : 'The line impedances and lengths are design variables; the lines are ideal TEM lines (lossless).',
      ].join('\n'),
    ),
  );
  lines.push(`title "${title}"`, '');
  lines.push(`let z0 = ${quantity(z0, 'ohm')}      # source`);
  lines.push(`let f0 = ${quantity(f0, 'Hz')}      # match frequency`);
  if (m.loadFile !== undefined) lines.push(`# the load at f0, from the data file: ${quantity(rl, 'ohm', 6)} resistance, ${quantity(xl, 'ohm', 6)} reactance`);
  else {
    lines.push(`let rl = ${quantity(rl, 'ohm')}      # load resistance`);
    if (complexLoad) lines.push(`let xl = ${quantity(xl, 'ohm')}      # load reactance at f0`);
  }
  lines.push('', ...piece.lets, '', ...piece.elements, '');
  lines.push('# the load');
  if (m.loadFile !== undefined) {
    const rel = relative(dirname(resolve(netlistPath)), resolve(m.loadFile)).split('\\').join('/');
    lines.push(`datafile rload file="${rel.replace(/["\\]/g, (c) => `\\${c}`)}" p1=load`);
  } else if (complexLoad) {
    lines.push('resistor rload a=load b=lx value=rl');
    lines.push(xl > 0 ? 'inductor xload a=lx b=ground value=xl/(2*pi*f0)' : 'capacitor xload a=lx b=ground value=-1/(2*pi*f0*xl)');
  } else lines.push('resistor rload a=load b=ground value=rl');
  lines.push('', 'port 1 plus=in ref=z0', '');
  if (m.band) band = m.band;
  const lo = m.band ? m.band[0] : band ? Math.max(band[0] / 2, f0 / 4) : f0 / 2;
  const hiF = m.band ? m.band[1] : band ? Math.min(band[1] * 1.5, 1.99 * f0) : 1.5 * f0;
  lines.push(`sweep linear start=${quantity(lo, 'Hz', 6)} stop=${quantity(hiF, 'Hz', 6)} points=401`);
  lines.push(`sweep list freqs=f0${band ? `, ${quantity(band[0], 'Hz')}, ${quantity(band[1], 'Hz')}` : ''}`);
  lines.push('');
  const atF0 = m.network === 'chebyshev' && evenCount(sections) ? undefined : 40;
  const losslessRoom = m.q !== undefined ? `; the part losses take some of it` : '';
  if (atF0 !== undefined && !(m.series !== undefined)) {
    lines.push(`# Matched at f0: no reflection there in theory; 40 dB of return loss leaves room for rounding${losslessRoom}.`);
    lines.push(`spec match_at_f0 measure=rl(1) min=${m.q !== undefined ? 30 : atF0} dB over=f0, f0`);
  } else if (atF0 !== undefined) {
    lines.push(`# Matched at f0 in theory; snapped to ${m.series}, 20 dB of return loss is asked for there.`);
    lines.push('spec match_at_f0 measure=rl(1) min=20 dB over=f0, f0');
  }
  let exactMax: number | undefined;
  if (band && gammaMax !== undefined && sections) {
    exactMax = transformerReflection(sections, z0, rl, f0, band);
    const rlMin = -20 * Math.log10(exactMax) - 0.1;
    lines.push(
      ...comment(
        `Over the band: the largest reflection of these sections, from their chain matrices, is ${short(exactMax, 4)} (${short(-20 * Math.log10(exactMax), 4)} dB of return loss; small-reflection theory predicted ${short(gammaMax, 4)}); the limit leaves 0.1 dB of room for rounding.`,
      ),
    );
    lines.push(`spec band_match measure=rl(1) min=${short(rlMin, 6)} dB over=${quantity(band[0], 'Hz')}, ${quantity(band[1], 'Hz')}`);
  }
  if (m.loadFile !== undefined && m.minReturnLoss !== undefined) {
    lines.push(...comment(`Over the band asked for: at least ${short(m.minReturnLoss)} dB of return loss with the load of the data file.`));
    lines.push(`spec band_match measure=rl(1) min=${short(m.minReturnLoss, 8)} dB over=${quantity(m.band![0], 'Hz')}, ${quantity(m.band![1], 'Hz')}`);
  }
  const text = lines.join('\n') + '\n';
  const summary = `${title}\n${how}\n\n` + columns([['part', 'role', 'value', ...(m.series ? [`before ${m.series}`] : [])], ...piece.rows]);
  return { request: m, text, summary, sections, gammaMax, exactMax };
}

/**
 * The largest |Γ| over a band of quarter-wave sections (at f0) into a resistance, from the chain
 * matrix of each lossless line, [[cos θ, jZ·sin θ], [j·sin θ/Z, cos θ]] (common practice).
 */
export function transformerReflection(z: readonly number[], z0: number, rl: number, f0: number, band: readonly [number, number]): number {
  let worst = 0;
  const points = 2001;
  for (let k = 0; k < points; k++) {
    const f = band[0] + ((band[1] - band[0]) * k) / (points - 1);
    const th = (Math.PI / 2) * (f / f0);
    // impedance seen looking toward the load, from the load end back to the source
    let zr = rl;
    let zi = 0;
    for (let i = z.length - 1; i >= 0; i--) {
      const zc = z[i]!;
      const t = Math.tan(th);
      // Zin = Zc·(ZL + jZc·t)/(Zc + jZL·t)
      const nr = zr;
      const ni = zi + zc * t;
      const dr = zc - zi * t;
      const di = zr * t;
      const d = dr * dr + di * di;
      [zr, zi] = [(zc * (nr * dr + ni * di)) / d, (zc * (ni * dr - nr * di)) / d];
    }
    const g = Math.hypot(zr - z0, zi) / Math.hypot(zr + z0, zi);
    worst = Math.max(worst, g);
  }
  return worst;
}

function evenCount(s: number[] | undefined): boolean {
  return s !== undefined && s.length % 2 === 0;
}
