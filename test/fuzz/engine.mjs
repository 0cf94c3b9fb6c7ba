// Fuzzing engine for scatterbox: seeded generation and mutation of netlists and network-data files,
// and the oracle that judges what the library does with them. Plain ESM JavaScript (with
// engine.d.mts beside it) so that the suite (test/fuzz.test.ts, through vitest) and
// `npm run fuzz` (scripts/fuzz.mjs, on the compiled dist/) share one implementation. The library
// is always passed in (`lib`): the source tree in one case, dist/ in the other.
//
// A case is described by a small record of non-negative integers, `{ family, seed, ops }`:
// `family` picks the starting text (a demo netlist from circuits/, or a generated netlist,
// Touchstone or JSON file), `seed` drives the generator, and each op `[kind, a, b, c]` is one
// mutation (delete/duplicate/swap lines and tokens, splice a dictionary word, flip a character,
// truncate …). fast-check shrinks such records (fewer ops, smaller numbers); the fuzz script draws
// them from the PRNG below. Everything is deterministic in the record.

import { posix } from 'node:path';

// ---------------------------------------------------------------------------------------------
// PRNG: mulberry32 (Tommy Ettinger, public domain; 32-bit state, period 2^32), common practice
// for small reproducible fuzzers. `rng.u32()` is uniform on [0, 2^32).

/** @param {number} seed */
export function makeRng(seed) {
  let a = seed >>> 0;
  const u32 = () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return (t ^ (t >>> 14)) >>> 0;
  };
  const int = (n) => (n <= 0 ? 0 : u32() % n);
  return {
    u32,
    int,
    float: () => u32() / 4294967296,
    chance: (p) => u32() / 4294967296 < p,
    pick: (arr) => arr[int(arr.length)],
  };
}

// ---------------------------------------------------------------------------------------------
// Dictionary

const STATEMENTS = ['title', 'let', 'port', 'sweep', 'spec', 'block', 'end', 'include'];
const SWEEP_WORDS = ['vary', 'to', 'series', 'step', 'E24', 'E96', 'E7', 'linear', 'log', 'list', 'start', 'stop', 'points', 'step', 'per_decade', 'freqs'];
const TOLERANCE_WORDS = ['tol', 'normal', 'cut', 'lot', '%', 'tol 5%', 'tol normal 2% cut 3', 'lot caps', 'lot caps tol normal 3%'];
const PORT_WORDS = ['plus', 'minus', 'ref', 'ref_x'];
const SPEC_WORDS = ['measure', 'min', 'max', 'over', 'above', 'below', 'il(2,1)', 'rl(1)', 'db(S21)', 'mu', 'k', 'vswr(1)', 'gd(2,1)', 'S(2,1)', 'zin_re(1)', 'zin_im(1)', 'mag', 'msg'];
const UNITS = ['ohm', 'ohms', 'Ω', 'Ω', 'kohm', 'Mohm', 'mohm', 'kΩ', 'S', 'mS', 'uS', 'µS', 'F', 'pF', 'nF', 'uF', 'fF', 'µF', 'μF', 'H', 'nH', 'pH', 'uH', 'mH',
  'Hz', 'kHz', 'MHz', 'GHz', 'THz', 'mHz', 's', 'ps', 'ns', 'us', 'm', 'mm', 'cm', 'um', 'mil', 'in', 'rad', 'deg', 'dB', 'dB/m', 'dB/cm', 'S/m', 'V', 'A', 'W', 'mV',
  'Mhz', 'pf', 'Ohm', 'KHz', 'furlong', 'kg', 'K'];
const NUMBERS = ['0', '1', '-1', '2', '50', '0.5', '.5', '5.', '1e308', '1.7976931348623157e308', '1e309', '1e400', '1e-320', '4.9e-324', '1e-300', '1e-308', '-0', '0.0',
  'NaN', 'Infinity', '-Infinity', '99999999999999999999999999', '100000000', '100000', '9000', '1e6', '1e7', '1e9', '1e12', '1e15', '2^1024', '10^308', '1e300',
  '7000', '-7000', '0x10', '1_000', '1,5', '3.', '1e', '1e+', '00000001', '1' + '0'.repeat(400)];
const JS_KEYS = ['constructor', '__proto__', 'toString', 'hasOwnProperty', 'valueOf', 'prototype', 'isPrototypeOf', '__defineGetter__', 'toLocaleString', 'propertyIsEnumerable', 'length', 'then'];
const FUNCTIONS = ['sqrt', 'exp', 'ln', 'log10', 'sin', 'cos', 'tan', 'atan', 'abs', 'min', 'max', 'round', 'pi', 'e', 'il', 'rl', 'db', 'S'];
const OPERATORS = ['+', '-', '*', '/', '^', '(', ')', ',', '=', '==', '\\', '#', '"', '"x"', '""', '"\\"', '"\\n"', 'at', 'at 1 GHz', '=,', '((', '))', '*-', '^-', '^^', '-(-(-1))'];
const NAMES = ['ground', 'in', 'out', 'n1', 'n2', 'a', 'b', 'x', 'z0', 'fc', 'f0', 'r1', 'c1', 'l1', 'q1', 't1', 'µ', 'Ω', 'ground.x', '_', 'gnd', '0', 'value', 'file', 'terminals', 'interp', 'polar', 'cartesian'];
const FILES = ['"parts/branchline-2g45.sbx"', '"data/bandpass-2g45-measured.s2p"', '"/dev/zero"', '"/dev/stdin"', '"."', '""', '"x.s9000p"', '"nosuch.s2p"', '"nosuch.sbx"', '"fuzz.sbx"',
  '"data/x.json"', '"../circuits/pad-10db-pi.sbx"', '"a.s0p"', '"a.s1p"', '"a.s99999999999999999999p"'];
const CHARS = ['\r', '\n', '\r\n', '\t', '\u0000', ' ', '\\', '"', '#', '=', '(', ')', ',', '\u00b5', '\u03bc', '\u2126', '\u03a9', '\u00a0', '\u2028', '\ufeff', '\ud83d\ude00', '\ud800', 'é', '\u0301', '\f', '\v'];

/**
 * The words mutations splice in: statement and element keywords and property names (from the
 * element registry), units and prefixes, operators, extreme numbers, object keys, names, files.
 * @param {ReadonlyMap<string, { keyword: string; properties: readonly { key: string }[]; textProperties?: readonly { key: string; choices?: readonly string[] }[]; terminals: readonly { key: string }[] }>} elementMap the registry (ELEMENTS)
 */
export function makeDictionary(elementMap) {
  const elements = [...(elementMap instanceof Map ? elementMap.values() : elementMap)];
  const elementWords = [];
  for (const e of elements) {
    elementWords.push(e.keyword);
    for (const p of e.properties) elementWords.push(p.key);
    for (const p of e.textProperties ?? []) elementWords.push(p.key, ...(p.choices ?? []));
    for (const t of e.terminals) elementWords.push(t.key);
  }
  const words = [...new Set([...STATEMENTS, ...SWEEP_WORDS, ...TOLERANCE_WORDS, ...PORT_WORDS, ...SPEC_WORDS, ...elementWords, ...UNITS, ...NUMBERS, ...JS_KEYS, ...FUNCTIONS, ...OPERATORS, ...NAMES, ...FILES])];
  return {
    words,
    keywords: [...STATEMENTS, ...elements.map((e) => e.keyword)],
    elements: elements.map((e) => ({
      keyword: e.keyword,
      terminals: e.terminals.map((t) => t.key),
      properties: e.properties.map((p) => p.key),
      textProperties: (e.textProperties ?? []).map((p) => ({ key: p.key, choices: p.choices ?? [] })),
    })),
  };
}

// ---------------------------------------------------------------------------------------------
// Large inputs (deep nesting, long sums, long strings). `scale` 0..1 bounds their size: the suite
// uses small sizes, the fuzz script the sizes the issue names.

/** @param {number} which @param {number} size */
function bigItem(which, size) {
  switch (which % 9) {
    case 0: return '('.repeat(size) + '1' + ')'.repeat(size);
    case 1: return Array.from({ length: size }, (_, i) => String(i + 1)).join('+');
    case 2: return '"' + 'x'.repeat(size * 100) + '"';
    case 3: return '-'.repeat(size) + '1';
    case 4: return 'sqrt('.repeat(size) + '4' + ')'.repeat(size);
    case 5: return '2' + '^2'.repeat(size);
    case 6: return 'x'.repeat(size * 100);
    case 7: return Array.from({ length: size }, () => '1 pF').join(', ');
    default: return '1' + '0'.repeat(size * 10);
  }
}

/** Sizes of large items: up to 10,000 (e.g. 10,000 parentheses, a 1,000,000-character string). */
function bigSize(c, scale) {
  const sizes = [3, 30, 201, 300, 1000, 3000, 10000];
  const max = Math.max(1, Math.round(sizes.length * Math.min(1, Math.max(0, scale))));
  return sizes[c % max];
}

// ---------------------------------------------------------------------------------------------
// Text helpers

/** Splits into lines keeping each line's break, so joining gives the text back. */
export function splitLines(text) {
  return text.match(/[^\r\n]*(?:\r\n|\r|\n)|[^\r\n]+$/g) ?? [];
}

/** Token boundaries: runs of non-space characters, as [start, end) pairs. */
function tokenSpans(text) {
  const spans = [];
  const re = /[^\s=,()]+|[=,()]/g;
  let m;
  while ((m = re.exec(text)) !== null) spans.push([m.index, m.index + m[0].length]);
  return spans;
}

/**
 * Applies one mutation. `op` is `[kind, a, b, c]`; each number is reduced modulo what it indexes.
 * @param {string} text @param {number[]} op @param {{ words: string[] }} dict @param {number} scale
 */
export function mutate(text, op, dict, scale = 1) {
  const [kind = 0, a = 0, b = 0, c = 0] = op;
  const lines = splitLines(text);
  const toks = tokenSpans(text);
  const word = dict.words[b % dict.words.length];
  switch (kind % 16) {
    case 0: // delete a line
      if (lines.length) lines.splice(a % lines.length, 1);
      return lines.join('');
    case 1: { // duplicate a line
      if (!lines.length) return text;
      const i = a % lines.length;
      lines.splice(i, 0, withBreak(lines[i]));
      return lines.join('');
    }
    case 2: { // swap two lines
      if (lines.length < 2) return text;
      const i = a % lines.length, j = b % lines.length;
      const li = withBreak(lines[i]), lj = withBreak(lines[j]);
      lines[i] = lj; lines[j] = li;
      return lines.join('');
    }
    case 3: { // delete a token
      if (!toks.length) return text;
      const [s, e] = toks[a % toks.length];
      return text.slice(0, s) + text.slice(e);
    }
    case 4: { // duplicate a token
      if (!toks.length) return text;
      const [s, e] = toks[a % toks.length];
      return text.slice(0, e) + ' ' + text.slice(s, e) + text.slice(e);
    }
    case 5: { // swap two tokens
      if (toks.length < 2) return text;
      let [x, y] = [toks[a % toks.length], toks[b % toks.length]];
      if (x[0] > y[0]) [x, y] = [y, x];
      if (x[0] === y[0]) return text;
      return text.slice(0, x[0]) + text.slice(y[0], y[1]) + text.slice(x[1], y[0]) + text.slice(x[0], x[1]) + text.slice(y[1]);
    }
    case 6: { // replace a token by a dictionary word
      if (!toks.length) return word;
      const [s, e] = toks[a % toks.length];
      return text.slice(0, s) + word + text.slice(e);
    }
    case 7: { // insert a dictionary word before a token
      if (!toks.length) return word + text;
      const [s] = toks[a % toks.length];
      return text.slice(0, s) + word + (c % 2 ? '' : ' ') + text.slice(s);
    }
    case 8: { // flip a bit of one character
      if (!text.length) return text;
      const i = a % text.length;
      const code = text.charCodeAt(i) ^ (1 << (b % 8));
      return text.slice(0, i) + String.fromCharCode(code) + text.slice(i + 1);
    }
    case 9: // truncate
      return text.slice(0, a % (text.length + 1));
    case 10: { // insert a special character
      const i = a % (text.length + 1);
      return text.slice(0, i) + CHARS[b % CHARS.length] + text.slice(i);
    }
    case 11: { // replace the value after an `=`
      const eqs = [];
      for (let i = 0; i < text.length; i++) if (text[i] === '=') eqs.push(i);
      if (!eqs.length) return text;
      const at = eqs[a % eqs.length] + 1;
      const rest = text.slice(at);
      const m = /^\s*[^\s]+/.exec(rest);
      const end = at + (m ? m[0].length : 0);
      const value = c % 3 === 0 ? bigItem(b, bigSize(c, scale)) : word;
      return text.slice(0, at) + value + text.slice(end);
    }
    case 12: { // replace a token by a large item
      const item = bigItem(b, bigSize(c, scale));
      if (!toks.length) return item;
      const [s, e] = toks[a % toks.length];
      return text.slice(0, s) + item + text.slice(e);
    }
    case 13: { // repeat a line many times
      if (!lines.length) return text;
      const i = a % lines.length;
      const n = 1 + (c % Math.max(1, Math.round(200 * scale)));
      lines.splice(i, 0, ...Array(n).fill(withBreak(lines[i])));
      return lines.join('');
    }
    case 14: { // change every line break to one style (CR, LF, CRLF)
      const nl = ['\r', '\n', '\r\n'][b % 3];
      return text.replace(/\r\n|\r|\n/g, nl);
    }
    default: { // replace a number by an extreme number
      const nums = [];
      const re = /\d+(?:\.\d*)?(?:[eE][+-]?\d+)?/g;
      let m;
      while ((m = re.exec(text)) !== null) nums.push([m.index, m.index + m[0].length]);
      if (!nums.length) return text;
      const [s, e] = nums[a % nums.length];
      return text.slice(0, s) + NUMBERS[b % NUMBERS.length] + text.slice(e);
    }
  }
}

function withBreak(line) {
  return /[\r\n]$/.test(line) ? line : line + '\n';
}

// ---------------------------------------------------------------------------------------------
// Netlist generator (from the grammar, grammar/README.md §1–§3 and §7)

const VALUE_UNITS = ['ohm', 'pF', 'nH', 'S', 'mm', 'deg', 'GHz', 'MHz', 'ps', 'dB/m', 'S/m', ''];

function genNumber(rng) {
  if (rng.chance(0.15)) return rng.pick(NUMBERS);
  const mant = rng.chance(0.5) ? String(1 + rng.int(999)) : (rng.float() * 100).toPrecision(1 + rng.int(6));
  return rng.chance(0.3) ? `${mant}e${rng.int(41) - 20}` : mant;
}

function genExpr(rng, names, depth) {
  const r = rng.int(depth > 3 ? 3 : 10);
  if (r === 0 && names.length) return rng.pick(names);
  if (r <= 2) return `${genNumber(rng)}${rng.chance(0.6) ? ' ' + rng.pick(VALUE_UNITS) : ''}`.trimEnd();
  if (r <= 5) return `${genExpr(rng, names, depth + 1)} ${rng.pick(['+', '-', '*', '/'])} ${genExpr(rng, names, depth + 1)}`;
  if (r === 6) return `(${genExpr(rng, names, depth + 1)})`;
  if (r === 7) return `${rng.pick(['sqrt', 'exp', 'ln', 'log10', 'sin', 'cos', 'abs', 'round', 'atan'])}(${genExpr(rng, names, depth + 1)})`;
  if (r === 8) return `${rng.pick(['min', 'max'])}(${genExpr(rng, names, depth + 1)}, ${genExpr(rng, names, depth + 1)})`;
  return `-${genExpr(rng, names, depth + 1)}`;
}

/**
 * A random netlist from the grammar: parameters, elements of every type with random values,
 * ports, sweeps, specs, blocks (also nested, cyclic or exponentially expanding ones).
 * @returns {{ text: string, files: Record<string, string>, origin: string }} files: extra included files (paths relative to circuits/)
 */
export function generateNetlist(seed, dict, scale = 1) {
  const rng = makeRng(seed);
  const out = [];
  const files = {};
  const params = [];
  const nodes = ['in', 'out', 'n1', 'n2', 'n3', 'ground'];
  const family = rng.int(10);
  if (rng.chance(0.5)) out.push(`title "${rng.pick(['fuzz', 'a # b', 'x\\"y', 'NaN', ''])}"`);
  const nLet = rng.int(6);
  for (let i = 0; i < nLet; i++) {
    const name = rng.chance(0.1) ? rng.pick(JS_KEYS) : `p${i}`;
    out.push(`let ${name} = ${genExpr(rng, params, 0)}`);
    params.push(name);
  }
  // design variables (grammar/README.md §3.2): a value inside its range, in a unit or none
  if (rng.chance(0.3)) {
    for (let i = 0, n = 1 + rng.int(2); i < n; i++) {
      const unit = rng.pick(['', ' pF', ' nH', ' ohm', ' mS']);
      const v = Number((0.5 + 9 * rng.float()).toPrecision(3));
      const series = rng.chance(0.3) ? ` series ${rng.pick(['E6', 'E24', 'E96'])}` : rng.chance(0.2) ? ` step ${(v / 20).toPrecision(2)}${unit}` : '';
      out.push(`let v${i} = ${v}${unit} vary ${(v / 3).toPrecision(3)}${unit} to ${(v * 3).toPrecision(3)}${unit}${series}`);
      params.push(`v${i}`);
    }
  }
  const nEl = 1 + rng.int(8);
  for (let i = 0; i < nEl; i++) out.push(genElement(rng, dict, params, nodes, `e${i}`));
  if (family === 1 || family === 2 || family === 3) {
    // Nested, cyclic or doubling blocks (grammar/README.md §3.7).
    const depth = bigSize(rng.int(7), scale) / (family === 3 ? 100 : 1);
    const n = Math.max(2, Math.min(family === 3 ? 40 : 3000, Math.round(depth)));
    for (let i = 0; i < n; i++) {
      const next = family === 2 ? `b${(i + 1) % n}` : i + 1 < n ? `b${i + 1}` : null;
      out.push(`block b${i} terminals=x, y`);
      if (next) {
        out.push(`  ${next} u1 x=x y=y`);
        if (family === 3) out.push(`  ${next} u2 x=x y=y`);
      } else out.push('  resistor r a=x b=y value=50 ohm');
      out.push(`end`);
    }
    out.push('b0 top x=in y=out');
  }
  if (family === 4) {
    // An include chain (grammar/README.md §3.8), served from memory.
    const n = Math.max(2, Math.min(3000, bigSize(rng.int(7), scale)));
    out.push('include "inc/f0.sbx"');
    for (let i = 0; i < n; i++) files[`inc/f${i}.sbx`] = i + 1 < n ? `include "f${i + 1}.sbx"\n` : 'resistor rz a=in b=ground value=50 ohm\n';
    if (rng.chance(0.3)) files[`inc/f${n - 1}.sbx`] = 'include "f0.sbx"\n';
  }
  const nPort = rng.int(4);
  for (let i = 0; i < nPort; i++) {
    let line = `port ${rng.chance(0.9) ? i + 1 : rng.pick(NUMBERS)} plus=${rng.pick(nodes)}`;
    if (rng.chance(0.3)) line += ` minus=${rng.pick(nodes)}`;
    if (rng.chance(0.4)) line += ` ref=${genExpr(rng, params, 2)}`;
    if (rng.chance(0.15)) line += ` ref_x=${genExpr(rng, params, 2)}`;
    out.push(line);
  }
  const nSweep = rng.int(3);
  for (let i = 0; i < nSweep; i++) {
    const kind = rng.pick(['linear', 'log', 'list']);
    if (kind === 'list') out.push(`sweep list freqs=${Array.from({ length: 1 + rng.int(4) }, () => genExpr(rng, params, 2)).join(', ')}`);
    else {
      const count = rng.pick(['points', 'step', 'per_decade']);
      const start = rng.chance(0.8) ? `${1 + rng.int(100)} MHz` : genExpr(rng, params, 2);
      const stop = rng.chance(0.8) ? `${1 + rng.int(10)} GHz` : genExpr(rng, params, 2);
      const cval = count === 'step' ? `${1 + rng.int(100)} MHz` : rng.chance(0.85) ? String(1 + rng.int(200)) : rng.pick(NUMBERS);
      out.push(`sweep ${kind} start=${start} stop=${stop} ${count}=${cval}`);
    }
  }
  const nSpec = rng.int(3);
  for (let i = 0; i < nSpec; i++) {
    out.push(`spec s${i} measure=${rng.pick(SPEC_WORDS.slice(6))} ${rng.pick(['min', 'max'])}=${genExpr(rng, [], 2)} ${rng.pick(['over=1 GHz, 2 GHz', 'above=1 GHz', 'below=2 GHz', ''])}`.trimEnd());
  }
  // Shuffle a little: statements may come in any order.
  if (rng.chance(0.3)) for (let i = out.length - 1; i > 0; i--) { const j = rng.int(i + 1); [out[i], out[j]] = [out[j], out[i]]; }
  const nl = rng.pick(['\n', '\n', '\n', '\r\n', '\r']);
  const origin = ['generated', 'generated: nested blocks', 'generated: block cycle', 'generated: doubling blocks', 'generated: include chain'][family] ?? 'generated';
  return { text: out.join(nl) + nl, files, origin };
}

function genElement(rng, dict, params, nodes, name) {
  const el = rng.pick(dict.elements);
  const parts = [el.keyword, name];
  for (const t of el.terminals) if (rng.chance(0.95)) parts.push(`${t}=${rng.pick(nodes)}`);
  for (const p of el.properties) {
    if (rng.chance(0.5)) {
      let v = genExpr(rng, params, 1);
      if (rng.chance(0.1)) v += ` at ${genExpr(rng, params, 3)}`;
      parts.push(`${p}=${v}`);
    }
  }
  for (const p of el.textProperties) {
    if (rng.chance(0.7)) parts.push(`${p.key}=${p.choices.length && rng.chance(0.8) ? rng.pick(p.choices) : rng.pick(FILES)}`);
  }
  return parts.join(' ');
}

// ---------------------------------------------------------------------------------------------
// Network-data generators: Touchstone 1.1 / 2.0 (every data format, noise sections) and JSON

const FREQ_UNITS = ['Hz', 'kHz', 'MHz', 'GHz'];

function genValue(rng) {
  if (rng.chance(0.03)) return rng.pick(NUMBERS);
  const mag = rng.chance(0.9) ? rng.float() * 2 - 1 : (rng.float() - 0.5) * 10 ** (rng.int(40) - 20);
  return String(Number(mag.toPrecision(1 + rng.int(9))));
}

/**
 * A random Touchstone file. Returns its text and a file name whose `.sNp` matches (mostly).
 * @returns {{ text: string, name: string }}
 */
export function generateTouchstone(seed) {
  const rng = makeRng(seed);
  const ports = rng.chance(0.9) ? 1 + rng.int(4) : rng.pick([5, 6, 8]);
  const v2 = rng.chance(0.4);
  const param = ports === 2 || v2 ? rng.pick(['S', 'S', 'Z', 'Y', 'H', 'G']) : rng.pick(['S', 'S', 'Z', 'Y']);
  const fmt = rng.pick(['RI', 'MA', 'DB']);
  const unit = rng.pick(FREQ_UNITS);
  const r = rng.chance(0.9) ? '50' : genValue(rng);
  const nf = rng.int(12);
  const lines = [];
  if (rng.chance(0.5)) lines.push('! generated by the scatterbox fuzzer');
  if (v2) lines.push('[Version] 2.0');
  lines.push(`# ${unit} ${param} ${fmt} R ${r}`);
  const matrix = v2 ? rng.pick(['Full', 'Full', 'Lower', 'Upper']) : 'Full';
  const noise = ports === 2 && rng.chance(0.3);
  const nNoise = noise ? 1 + rng.int(4) : 0;
  if (v2) {
    lines.push(`[Number of Ports] ${ports}`);
    if (ports === 2) lines.push(`[Two-Port Data Order] ${rng.pick(['12_21', '21_12'])}`);
    lines.push(`[Number of Frequencies] ${nf}`);
    if (noise) lines.push(`[Number of Noise Frequencies] ${nNoise}`);
    if (rng.chance(0.5)) lines.push(`[Reference] ${Array.from({ length: ports }, () => (rng.chance(0.8) ? '50' : genValue(rng))).join(' ')}`);
    lines.push(`[Matrix Format] ${matrix}`);
    if (rng.chance(0.1)) lines.push('[Begin Information]', 'anything', '[End Information]');
    lines.push('[Network Data]');
  }
  let f = rng.float() * 10;
  for (let k = 0; k < nf; k++) {
    f += rng.chance(0.95) ? rng.float() * 10 + 1e-3 : -1;
    const vals = [];
    for (let i = 0; i < ports; i++) {
      for (let j = 0; j < ports; j++) {
        if (matrix === 'Lower' && j > i) continue;
        if (matrix === 'Upper' && j < i) continue;
        vals.push(genValue(rng), genValue(rng));
      }
    }
    // Version 1.1 layout: two-ports on one line, larger ones four entries per line.
    const per = ports <= 2 ? vals.length : 8;
    const chunks = [];
    for (let x = 0; x < vals.length; x += per) chunks.push(vals.slice(x, x + per).join(' '));
    lines.push(`${Number(f.toPrecision(8))} ${chunks.join('\n')}`);
  }
  if (noise) {
    if (v2) lines.push('[Noise Data]');
    let fn = rng.float();
    for (let k = 0; k < nNoise; k++) {
      fn += rng.float() * 5 + 0.01;
      lines.push(`${Number(fn.toPrecision(6))} ${(rng.float() * 5).toFixed(2)} ${rng.float().toFixed(3)} ${(rng.float() * 360 - 180).toFixed(1)} ${rng.float().toFixed(3)}`);
    }
  }
  if (v2) lines.push('[End]');
  const nl = rng.pick(['\n', '\n', '\r\n']);
  const ext = rng.chance(0.95) ? `.s${ports}p` : rng.pick(['.s9000p', '.s0p', '.snp', '.txt', '.s99999999999999999999p']);
  return { text: lines.join(nl) + nl, name: `fuzz${ext}` };
}

/**
 * A random scatterbox JSON network file (schema `scatterbox.network/1`, src/io/json.ts).
 * @returns {{ text: string, name: string }}
 */
export function generateJsonNetwork(seed) {
  const rng = makeRng(seed);
  const ports = rng.chance(0.95) ? 1 + rng.int(4) : rng.pick([0, 100000, 1.5, -1]);
  const p = Math.max(0, Math.min(4, Math.floor(ports)));
  const nf = rng.int(8);
  let f = rng.float() * 1e9;
  const freqs = [];
  for (let k = 0; k < nf; k++) { f += rng.float() * 1e9 + 1; freqs.push(Number(f.toPrecision(9))); }
  const data = freqs.map(() => Array.from({ length: p }, () => Array.from({ length: p }, () => [Number(genValue(rng)), Number(genValue(rng))])));
  const doc = {
    schema: rng.chance(0.97) ? 'scatterbox.network/1' : 'other',
    title: rng.chance(0.5) ? 'fuzz' : null,
    comments: rng.chance(0.5) ? ['a', 'b'] : [],
    parameter: rng.pick(['S', 'S', 'Z', 'Y']),
    ports,
    references_ohm: Array.from({ length: p }, () => (rng.chance(0.9) ? 50 : Number(genValue(rng)))),
    frequency_hz: freqs,
    data,
  };
  let text = JSON.stringify(doc, null, rng.chance(0.5) ? 2 : 0);
  // Non-JSON numbers as some writers produce them.
  if (rng.chance(0.05)) text = text.replace(/-?\d+\.\d+/, rng.pick(['NaN', 'Infinity', '1e400', '-1e999']));
  return { text, name: 'fuzz.json' };
}

// ---------------------------------------------------------------------------------------------
// Cases

/**
 * @typedef {{ family: number, seed: number, ops: number[][], set?: number, sweep?: number }} CaseSpec
 * @typedef {{ kind: 'netlist', main: string, files: Record<string, string>, origin?: string, changed?: string[], set?: string[], sweep?: string }
 *   | { kind: 'data', name: string, text: string, origin?: string }} FuzzCase
 */

/**
 * The texts the cases start from: the demo netlists and their included and data files, keyed by
 * their path under circuits/ (e.g. `parts/branchline-2g45.sbx`).
 * @typedef {{ netlists: string[], files: Record<string, string>, data: string[] }} Corpus
 */

const ROOT = 'circuits';

/**
 * Builds a netlist case from its spec: family 0..n-1 a demo netlist, n.. a generated one.
 * @param {CaseSpec} spec @param {Corpus} corpus @param {ReturnType<typeof makeDictionary>} dict
 * @returns {FuzzCase}
 */
export function netlistCase(spec, corpus, dict, scale = 1) {
  const files = {};
  for (const [k, v] of Object.entries(corpus.files)) files[`${ROOT}/${k}`] = v;
  const n = corpus.netlists.length;
  const fam = spec.family % (n + 4);
  let main;
  let text;
  let origin;
  if (fam < n) {
    main = `${ROOT}/${corpus.netlists[fam]}`;
    text = corpus.files[corpus.netlists[fam]];
    origin = corpus.netlists[fam];
  } else {
    main = `${ROOT}/fuzz.sbx`;
    const g = generateNetlist(spec.seed, dict, scale);
    text = g.text;
    origin = g.origin;
    for (const [k, v] of Object.entries(g.files)) files[`${ROOT}/${k}`] = v;
  }
  // Most ops go to the main file; an op whose kind is >= 16 goes to an included file instead.
  const targets = Object.keys(files).filter((f) => f !== main && f.endsWith('.sbx') && !corpus.netlists.includes(f.slice(ROOT.length + 1)));
  for (const op of spec.ops) {
    if ((op[0] ?? 0) >= 16 && targets.length) {
      const t = targets[(op[3] ?? 0) % targets.length];
      files[t] = mutate(files[t], [op[0] - 16, op[1], op[2], op[3]], dict, scale);
    } else text = mutate(text, op, dict, scale);
  }
  files[main] = text;
  /** @type {FuzzCase} */
  const c = { kind: 'netlist', main, files, origin };
  // Files that differ from the corpus (generated or mutated), for the reproducer.
  const changed = Object.keys(files).filter((f) => f !== main && files[f] !== corpus.files[f.slice(ROOT.length + 1)]);
  if (changed.length) c.changed = changed;
  if (spec.set !== undefined && spec.set % 4 === 1) c.set = [`${rng1(spec.set).pick(['z0', 'fc', 'n', ...JS_KEYS])}=${rng1(spec.set + 1).pick(['75 ohm', '1 GHz', ...NUMBERS, ...JS_KEYS])}`];
  if (spec.sweep !== undefined && spec.sweep % 4 === 1) c.sweep = rng1(spec.sweep).pick(['linear start=1 MHz stop=1 GHz points=11', 'log start=1e-320 MHz stop=1 GHz points=5', 'log start=1e-300 Hz stop=1 GHz points=5', 'list freqs=constructor', 'linear start=1 GHz stop=2 GHz per_decade=1e308', '']);
  return c;
}

function rng1(seed) {
  return makeRng(seed * 2654435761);
}

/**
 * Builds a data-file case: family 0..m-1 a corpus data file, then generated Touchstone, then JSON.
 * @param {CaseSpec} spec @param {Corpus} corpus @param {ReturnType<typeof makeDictionary>} dict
 * @returns {FuzzCase}
 */
export function dataCase(spec, corpus, dict, scale = 1) {
  const m = corpus.data.length;
  const fam = spec.family % (m + 6);
  let name;
  let text;
  if (fam < m) {
    name = `${ROOT}/${corpus.data[fam]}`;
    text = corpus.files[corpus.data[fam]];
  } else if (fam < m + 4) {
    const g = generateTouchstone(spec.seed);
    name = `${ROOT}/${g.name}`;
    text = g.text;
  } else {
    const g = generateJsonNetwork(spec.seed);
    name = `${ROOT}/${g.name}`;
    text = g.text;
  }
  for (const op of spec.ops) text = mutate(text, op, dict, scale);
  return { kind: 'data', name, text, origin: fam < m ? corpus.data[fam] : fam < m + 4 ? 'generated Touchstone' : 'generated JSON' };
}

/**
 * Draws a case spec from the PRNG (what fast-check's arbitrary draws in the suite).
 * @returns {CaseSpec}
 */
export function randomSpec(rng, maxOps = 6) {
  const nOps = rng.int(maxOps + 1);
  const ops = [];
  for (let i = 0; i < nOps; i++) ops.push([rng.int(rng.chance(0.1) ? 32 : 16), rng.u32(), rng.u32(), rng.u32()]);
  return { family: rng.u32(), seed: rng.u32(), ops, set: rng.int(16), sweep: rng.int(16) };
}

// ---------------------------------------------------------------------------------------------
// The oracle

/**
 * @typedef {'ok' | 'located' | 'documented' | 'crash' | 'nonfinite'} Status
 * @typedef {{ status: Status, reason: string, message?: string, stack?: string }} Outcome
 */

/** Error classes of the library that are documented outcomes even without a location. */
const DOCUMENTED = ['ElementValueError', 'VariableError', 'SingularSystemError', 'NonFiniteResultError', 'ConversionError', 'OutputError', 'TwoPortConversionError', 'FrequencyGridError', 'CompareError'];

/** A message starting with (or containing) an internal function name such as `createModeTransform:`. */
const INTERNAL_NAME = /(?:^|[\s(])([a-z][a-z0-9]*[A-Z][A-Za-z0-9]*):\s/;

/** The lines of a text as the grammar counts them (`\n`, `\r\n` or a lone `\r` end a line). */
const linesCache = new Map();

/** The lines of a text, split as the grammar splits them; the last few texts are kept (a case may have thousands of diagnostics). */
export function linesOf(text) {
  let lines = linesCache.get(text);
  if (lines === undefined) {
    if (linesCache.size >= 8) linesCache.clear();
    lines = text.split(/\r\n|\r|\n/);
    linesCache.set(text, lines);
  }
  return lines;
}

/**
 * Judges a located place: inside one of `sources` (line within 1..lines, column within 1..len+1).
 * @returns {string | undefined} what is wrong, if anything
 */
function placeProblem(file, line, column, sources) {
  const text = sources.get(file) ?? sources.get(posix.normalize(String(file)));
  if (text === undefined) return `location in a file that is not an input (${short(String(file))})`;
  const lines = linesOf(text);
  if (!(Number.isInteger(line) && line >= 1 && line <= lines.length)) return `location line outside the input (line ${line} of ${lines.length})`;
  const len = lines[line - 1].length;
  if (!(Number.isInteger(column) && column >= 1 && column <= len + 1)) return `location column outside its line (column ${column} of ${len + 1})`;
  return undefined;
}

function short(s, n = 120) {
  return s.length > n ? s.slice(0, n) + '…' : s;
}

/** Whether a written text holds a non-finite number (ignoring Touchstone comments and JSON strings). */
function nonFiniteIn(text, kind) {
  if (kind === 'json') {
    let doc;
    try {
      doc = JSON.parse(text);
    } catch (e) {
      return `written JSON does not parse (${e.message})`;
    }
    const walk = (v) => (typeof v === 'number' ? !Number.isFinite(v) : Array.isArray(v) ? v.some(walk) : v && typeof v === 'object' ? Object.entries(v).some(([k, x]) => k !== 'title' && k !== 'comments' && walk(x)) : false);
    return walk(doc) ? 'written JSON holds a non-finite number' : undefined;
  }
  for (const line of linesOf(text)) {
    if (kind === 'touchstone' && line.trimStart().startsWith('!')) continue;
    const body = kind === 'touchstone' ? line.replace(/!.*/, '') : line;
    if (/(^|[\s,])[-+]?(NaN|Infinity)(?=$|[\s,])/.test(body)) return `written ${kind === 'csv' ? 'CSV' : 'Touchstone'} holds ${/NaN/.test(body) ? 'NaN' : 'Infinity'}`;
  }
  return undefined;
}

function checkNetwork(net, what) {
  for (const [name, arr] of [['frequencies', net.frequencies], ['references', net.references], ['values', net.values]]) {
    if (!arr) continue;
    for (let i = 0; i < arr.length; i++) if (!Number.isFinite(arr[i])) return `${what}: ${name}[${i}] is ${arr[i]}`;
  }
  return undefined;
}

class Verdict extends Error {
  constructor(status, reason) {
    super(reason);
    this.status = status;
    this.reason = reason;
  }
}

/**
 * Judges an error thrown by the library: located (InputError / TouchstoneError with every place
 * inside the input), documented (a documented error class without location), or a crash.
 * @param {unknown} e @param {Map<string, string>} sources
 * @returns {Outcome}
 */
export function judgeError(lib, e, sources) {
  if (!(e instanceof Error)) return { status: 'crash', reason: `non-Error thrown: ${short(String(e))}` };
  const base = { message: short(e.message, 2000), stack: e.stack?.split('\n').slice(0, 8).join('\n') };
  if (e instanceof RangeError && /call stack/.test(e.message)) return { status: 'crash', reason: `RangeError: ${e.message}`, ...base };
  if (e instanceof lib.InputError) {
    for (const d of e.diagnostics) {
      const internal = INTERNAL_NAME.exec(d.message);
      if (internal && d.message.indexOf(internal[1]) < 3) return { status: 'crash', reason: `message names an internal function: ${short(d.message)}`, ...base };
      if (!d.span) return { status: 'crash', reason: `unlocated ${d.severity}: ${short(d.message)}`, ...base };
      const p = placeProblem(d.span.file, d.span.line, d.span.column, sources);
      if (p) return { status: 'crash', reason: `${p}: ${short(d.message)}`, ...base };
    }
    if (!e.diagnostics.some((d) => d.severity === 'error')) return { status: 'crash', reason: 'InputError with no error diagnostic', ...base };
    return { status: 'located', reason: e.diagnostics.find((d) => d.severity === 'error').message, ...base };
  }
  if (lib.JsonNetworkError && e instanceof lib.JsonNetworkError) {
    const p = placeProblem([...sources.keys()].at(-1), e.line, e.column, sources);
    if (p) return { status: 'crash', reason: `${p}: ${short(e.message)}`, ...base };
    return { status: 'located', reason: e.message, ...base };
  }
  if (e instanceof lib.TouchstoneError) {
    const p = placeProblem(e.file, e.line, e.column, sources);
    if (p) return { status: 'crash', reason: `${p}: ${short(e.message)}`, ...base };
    return { status: 'located', reason: e.message, ...base };
  }
  const name = e.constructor?.name ?? e.name;
  const internal = INTERNAL_NAME.exec(e.message);
  if (internal && e.message.indexOf(internal[1]) < 3) return { status: 'crash', reason: `${name}: message names an internal function: ${short(e.message)}`, ...base };
  if (DOCUMENTED.includes(name) || DOCUMENTED.includes(e.name)) return { status: 'documented', reason: `${name}: ${e.message}`, ...base };
  // parseJson documents its errors as plain Errors naming the field ("JSON network: …").
  if (name === 'Error' && /^JSON network: /.test(e.message)) return { status: 'documented', reason: e.message, ...base };
  return { status: 'crash', reason: `${name}: ${short(e.message)}`, ...base };
}

/**
 * Writes a network in every format, checking the texts; with `convert`, also as the other
 * parameter kinds and (two-ports) ABCD, T and H, as `scatterbox convert` does.
 */
function writeAll(lib, net, what, convert) {
  const bad = checkNetwork(net, what);
  if (bad) throw new Verdict('nonfinite', bad);
  const outputs = [
    ['touchstone', () => lib.renderNetwork(net, { format: 'touchstone', version: net.references.every((r) => r === net.references[0]) ? '1.1' : '2.0' })],
    ['touchstone', () => lib.renderNetwork(net, { format: 'touchstone', version: '2.0', data: 'DB', frequencyUnit: 'MHz' })],
    ['csv', () => lib.formatCsv(net, { format: 'MA' })],
    ['json', () => lib.formatJson(net)],
  ];
  if (convert) for (const p of ['S', 'Z', 'Y']) if (p !== net.parameter) outputs.push(['csv', () => lib.renderNetwork(net, { format: 'csv', parameter: p })]);
  if (convert && net.ports === 2) {
    for (const to of ['ABCD', 'T', 'H']) {
      outputs.push(['csv', () => lib.convertData(net, { to, format: 'csv' })]);
      outputs.push(['json', () => lib.convertData(net, { to, format: 'json' })]);
    }
  }
  let first;
  for (const [kind, write] of outputs) {
    let text;
    try {
      text = write();
    } catch (e) {
      if (e instanceof Verdict) throw e;
      const o = judgeError(lib, e, new Map());
      if (o.status === 'crash') throw new Verdict('crash', `writer: ${o.reason}`);
      continue;
    }
    const nf = nonFiniteIn(text, kind);
    if (nf) throw new Verdict('nonfinite', `${what}: ${nf}`);
    if (kind === 'touchstone' && first === undefined) first = text;
  }
  // What the writer wrote, the reader reads back.
  if (first !== undefined) {
    try {
      lib.parseTouchstone(first, { fileName: `back${lib.touchstoneExtension(net.ports)}` });
    } catch (e) {
      throw new Verdict('crash', `written Touchstone does not read back: ${short(e.message)}`);
    }
  }
}

/**
 * A netlist with design variables, evaluated by the design model (parameter graph, re-stamped
 * plan) at two values of every variable, against the netlist elaborated afresh at the same
 * values: the same S to rounding, or the same refusal (the model's documented errors).
 */
function designCheck(lib, c, options, sources) {
  const text = c.files[c.main];
  let model;
  try {
    model = lib.DesignModel.fromText(text, c.main, options);
  } catch (e) {
    const o = judgeError(lib, e, sources);
    return o.status === 'crash' ? { status: 'crash', reason: `design model: ${o.reason}`, stack: o.stack } : undefined;
  }
  const names = new Set(model.variables.map((v) => v.name));
  const keep = (options.set ?? []).filter((s) => !names.has(s.split('=')[0].trim()));
  for (const f of [0.3, 0.85]) {
    const x = model.variables.map((v) => {
      const t = v.lower + f * (v.upper - v.lower);
      return Math.min(v.upper, Math.max(v.lower, t));
    });
    model.setValues(x);
    let fast;
    let fastErr;
    try {
      fast = model.solve();
    } catch (e) {
      fastErr = e;
    }
    let ref;
    let refErr;
    try {
      ref = lib.solve(lib.loadNetlist(text, c.main, { ...options, set: [...keep, ...model.setOptions()] }).circuit);
    } catch (e) {
      refErr = e;
    }
    if (fastErr) {
      const o = judgeError(lib, fastErr, sources);
      if (o.status === 'crash') return { status: 'crash', reason: `design model: ${o.reason}`, stack: o.stack };
      continue;
    }
    const bad = checkNetwork(fast, 'design model');
    if (bad) return { status: 'nonfinite', reason: bad };
    if (!ref) {
      if (refErr instanceof lib.InputError) return { status: 'crash', reason: `design model solved values that elaboration refuses: ${short(refErr.diagnostics.find((d) => d.severity === 'error')?.message ?? '')}` };
      continue;
    }
    let worst = 0;
    let scale = 1;
    for (let k = 0; k < ref.values.length; k++) {
      worst = Math.max(worst, Math.abs(fast.values[k] - ref.values[k]));
      scale = Math.max(scale, Math.abs(ref.values[k]));
    }
    // the same pattern, ordering and pivot sequence; only the reference pivots may differ (rounding)
    if (!(worst <= 1e-9 * scale)) return { status: 'crash', reason: `design model differs from elaboration by ${worst} (S up to ${scale})` };
  }
  // tolerances: two yield samples through the model give finite results or documented refusals
  if (model.circuit.tolerances?.length > 0 && lib.runYield && model.circuit.specs.length > 0) {
    try {
      const r = lib.runYield(model, { samples: 2, seed: 7 });
      if (!(r.passed >= 0 && r.passed <= 2)) return { status: 'crash', reason: `yield: ${r.passed} of 2 samples pass` };
    } catch (e) {
      const o = judgeError(lib, e, sources);
      if (o.status === 'crash') return { status: 'crash', reason: `yield: ${o.reason}`, stack: o.stack };
    }
  }
  return undefined;
}

/**
 * Runs one case through the library in-process and judges the outcome.
 * @param {any} lib the library (src/index.ts or dist/src/index.js)
 * @param {FuzzCase} c
 * @returns {Outcome}
 */
export function runCase(lib, c) {
  const sources = new Map();
  try {
    if (c.kind === 'netlist') {
      for (const [k, v] of Object.entries(c.files)) sources.set(k, v);
      if (c.set) sources.set('--set', c.set.join('\n'));
      if (c.sweep !== undefined) sources.set('--sweep', c.sweep.split(';').map((s) => s.trim()).filter(Boolean).join('\n'));
      const readFile = (path) => {
        const key = posix.normalize(path);
        const text = c.files[key];
        if (text === undefined) {
          const err = new Error(`ENOENT: no such file or directory, open '${path}'`);
          err.code = 'ENOENT';
          throw err;
        }
        return text;
      };
      const options = { readFile };
      if (c.set) options.set = c.set;
      if (c.sweep !== undefined) options.sweep = c.sweep;
      const r = lib.loadNetlist(c.files[c.main], c.main, options);
      for (const w of r.warnings) {
        if (!w.span) return { status: 'crash', reason: `unlocated warning: ${short(w.message)}` };
        const p = placeProblem(w.span.file, w.span.line, w.span.column, sources);
        if (p) return { status: 'crash', reason: `warning ${p}: ${short(w.message)}` };
      }
      const net = lib.solve(r.circuit);
      if (net.referenceReactances) {
        const bad = checkNetwork({ values: net.values, references: net.referenceReactances }, 'solve');
        if (bad) return { status: 'nonfinite', reason: bad };
        return { status: 'ok', reason: 'solved (complex references)' };
      }
      writeAll(lib, net, 'solve', false);
      if ((r.circuit.variables?.length > 0 || r.circuit.tolerances?.length > 0) && lib.DesignModel) {
        const bad = designCheck(lib, c, options, sources);
        if (bad) return bad;
        return { status: 'ok', reason: 'solved, written and re-evaluated' };
      }
      return { status: 'ok', reason: 'solved and written' };
    }
    sources.set(c.name, c.text);
    const net = /\.json$/i.test(c.name) ? lib.parseJson(c.text) : lib.parseTouchstone(c.text, { fileName: c.name });
    writeAll(lib, net, 'read', true);
    return { status: 'ok', reason: 'read and written' };
  } catch (e) {
    if (e instanceof Verdict) return { status: e.status, reason: e.reason };
    return judgeError(lib, e, sources);
  }
}

/**
 * The class of a failure, for grouping: the reason's first line with numbers, quoted text and
 * long runs replaced, so that the same bug on different inputs falls into one class.
 */
export function failureClass(status, reason) {
  const first = String(reason).split('\n')[0];
  const cls = first
    .replace(/`[^`]*`/g, '`…`')
    .replace(/"[^"]*"/g, '"…"')
    .replace(/'[^']*'/g, "'…'")
    .replace(/[-+]?\d+(\.\d+)?(e[-+]?\d+)?/gi, 'N')
    .replace(/(N[\s,]*){2,}/g, 'N ')
    .slice(0, 160);
  return `${status}: ${cls}`;
}

/** A printable reproducer of a case: every file with its text (JSON-escaped so CR, NUL … show). */
export function describeCase(c, limit = 4000) {
  const show = (t) => {
    const s = JSON.stringify(t);
    return s.length > limit ? s.slice(0, limit) + `… (${t.length} characters)` : s;
  };
  if (c.kind === 'data') return `data file ${c.name}:\n${show(c.text)}`;
  const parts = [`netlist ${c.main}:\n${show(c.files[c.main])}`];
  const changed = c.changed ?? [];
  for (const f of changed.slice(0, 3)) parts.push(`file ${f}:\n${show(c.files[f])}`);
  if (changed.length > 3) parts.push(`… and ${changed.length - 3} more generated files (${changed[3]} …)`);
  if (c.set) parts.push(`--set ${JSON.stringify(c.set)}`);
  if (c.sweep !== undefined) parts.push(`--sweep ${JSON.stringify(c.sweep)}`);
  return parts.join('\n');
}
