// `scatterbox fit` on the command line (the compiled CLI in dist/, built by `npm test`): the
// tables, the `--set` options, the copy and the write-back (every other byte kept), exit codes,
// and the `--margin` reader under fuzzing.
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';

const require_mkdir = (p: string) => mkdirSync(p, { recursive: true });
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import { beforeAll, describe, expect, it } from 'vitest';
import { DesignModel } from '../src/design/model.js';
import { parseMargins } from '../src/design/fit.js';
import { valueRange } from '../src/design/write-back.js';
import { InputError } from '../src/diagnostics/diagnostic.js';
import { loadNetlist } from '../src/load.js';

const root = join(import.meta.dirname, '..');
const cli = join(root, 'bin', 'scatterbox.js');
const DEMO = join(root, 'circuits', 'bandpass-2g4.sbx');

function run(args: string[]) {
  const r = spawnSync(process.execPath, [cli, ...args], { cwd: root, encoding: 'utf8' });
  return { code: r.status, out: r.stdout, err: r.stderr };
}

/** The values of the `--set` options printed after `values as options:`. */
function printedSets(out: string): string[] {
  const line = out.split('\n')[out.split('\n').indexOf('values as options:') + 1]!;
  return [...line.matchAll(/--set '([^']*)'/g)].map((m) => m[1]!);
}

/** The text with every variable's value range cut out (what must stay byte for byte). */
function frame(text: string, file: string): string {
  const vars = loadNetlist(text, file).circuit.variables;
  let out = '';
  let at = 0;
  for (const [a, b] of vars.map((v) => valueRange(text, v)).sort((x, y) => x[0] - y[0])) {
    out += text.slice(at, a) + '\u0000';
    at = b;
  }
  return out + text.slice(at);
}

let dir: string;
let detuned: string;
let detunedText: string;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'sbx-fit-'));
  // the band-pass demo with its resonator parts detuned by 20 %, written as literal values
  const text = readFileSync(DEMO, 'utf8');
  const model = DesignModel.load(DEMO);
  detunedText = model.variables.reduce((t, v, i) => {
    const [a, b] = valueRange(t, v);
    return t.slice(0, a) + `${model.values[i]! * 1.2} ${v.unit}` + t.slice(b);
  }, text);
  detuned = join(dir, 'bandpass-detuned.sbx');
  writeFileSync(detuned, detunedText);
});

describe('scatterbox fit', () => {
  it('fits the detuned band-pass demo: tables, --set options that reload to the same values, a copy changed only in its values', () => {
    const out = join(dir, 'fitted.sbx');
    const r = run(['fit', detuned, '-o', out]);
    expect(r.err).toContain(`wrote ${out}`);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/^variable\s+start\s+fitted\s+snapped\s+unit$/m);
    expect(r.out).toMatch(/^spec\s+margin before\s+fitted\s+snapped\s+target\s+result$/m);
    expect(r.out).toMatch(/^passband_loss\s+-[\d.]+ dB\s+[\d.]+ dB\s+[\d.]+ dB\s+pass$/m);
    expect(r.out).toContain('every spec passes');
    // the written copy: only the four value texts differ
    const written = readFileSync(out, 'utf8');
    expect(frame(written, out)).toBe(frame(detunedText, detuned));
    expect(written).not.toBe(detunedText);
    // the --set options reload to the values of the copy, bit for bit, and the specs pass there
    const sets = printedSets(r.out);
    expect(sets.map((s) => s.split('=')[0])).toEqual(['lres', 'c1', 'c2', 'c3']);
    const viaSet = DesignModel.load(detuned, { set: sets });
    const viaCopy = DesignModel.load(out);
    expect(Array.from(viaSet.values)).toEqual(Array.from(viaCopy.values));
    expect(viaCopy.checkSpecs().every((s) => s.pass)).toBe(true);
    // `check` agrees
    expect(run(['check', out, '-q']).code).toBe(0);
  });

  it('--write-back updates the netlist itself with the same text as -o', () => {
    const file = join(dir, 'wb.sbx');
    writeFileSync(file, detunedText);
    const copy = join(dir, 'wb-copy.sbx');
    expect(run(['fit', file, '-o', copy, '-q']).code).toBe(0);
    const r = run(['fit', file, '--write-back', '-q']);
    expect(r.code).toBe(0);
    expect(r.err).toContain(`updated ${file}`);
    expect(readFileSync(file, 'utf8')).toBe(readFileSync(copy, 'utf8'));
  });

  it('a variable defined in an included file: -o refuses clearly, --write-back edits that file', () => {
    const sub = join(dir, 'inc');
    require_mkdir(sub);
    const part = 'let ctune = 2 pF vary 0.5 pF to 5 pF   # tuning part\n';
    const main = [
      'include "part.sbx"',
      'inductor l1 a=in b=mid value=4 nH',
      'capacitor c1 a=mid b=out value=ctune',
      'port 1 plus=in',
      'port 2 plus=out',
      'sweep list freqs=1.4 GHz, 1.5 GHz, 1.6 GHz',
      'spec tuned measure=il(2,1) max=0.0001 dB over=1.5 GHz, 1.5 GHz',
      '',
    ].join('\n');
    writeFileSync(join(sub, 'part.sbx'), part);
    writeFileSync(join(sub, 'main.sbx'), main);
    const refused = run(['fit', join(sub, 'main.sbx'), '-o', join(sub, 'copy.sbx'), '-q']);
    expect(refused.code).toBe(3);
    expect(refused.err).toContain('-o writes a copy of');
    expect(refused.err).toContain('part.sbx');
    expect(existsSync(join(sub, 'copy.sbx'))).toBe(false);
    const r = run(['fit', join(sub, 'main.sbx'), '--write-back', '-q']);
    expect(r.code, r.err).toBe(0);
    expect(readFileSync(join(sub, 'main.sbx'), 'utf8')).toBe(main);
    const edited = readFileSync(join(sub, 'part.sbx'), 'utf8');
    expect(edited).toMatch(/^let ctune = [\d.]+ pF vary 0\.5 pF to 5 pF {3}# tuning part\n$/);
    // a series L–C passes everything at its resonance, 1/(2π√(LC)): C = 1/((2π·1.5 GHz)²·4 nH) = 2.81 pF (common practice)
    const c = Number(/= ([\d.]+) pF/.exec(edited)![1]) * 1e-12;
    // IL ≤ 1e-4 dB: |X| = |ωL − 1/(ωC)| ≤ 0.48 ohm of ωL = 37.7 ohm, so C within 1.3 %
    expect(Math.abs(c / (1 / ((2 * Math.PI * 1.5e9) ** 2 * 4e-9)) - 1)).toBeLessThan(0.015);
  });

  it('exit 1 when a spec cannot pass; --write-back then leaves the netlist alone', () => {
    const file = join(dir, 'impossible.sbx');
    // a lossy band-pass cannot have less than 0 dB loss: the spec can never pass
    const text = detunedText.replace('spec passband_loss      measure=il(2,1)  max=3.5 dB', 'spec passband_loss      measure=il(2,1)  max=0 dB');
    writeFileSync(file, text);
    const r = run(['fit', file, '--write-back', '--max-evals', '40', '-q']);
    expect(r.code).toBe(1);
    expect(r.out).toMatch(/^passband_loss\s.*FAIL$/m);
    expect(r.err).toContain('not written back');
    expect(readFileSync(file, 'utf8')).toBe(text);
  });

  it('usage errors exit 2, input errors 3, nothing written', () => {
    const out = join(dir, 'never.sbx');
    for (const args of [
      ['--starts', '0'],
      ['--method', 'newton'],
      ['--max-evals', '1.5'],
      ['--write-back', '-o', out],
    ]) {
      const r = run(['fit', detuned, ...args]);
      expect(r.code, args.join(' ')).toBe(2);
      expect(r.err).toMatch(/^scatterbox: /);
    }
    const bad = run(['fit', detuned, '--margin', 'passband_dalay=1 ns', '-o', out]);
    expect(bad.code).toBe(3);
    expect(bad.err).toContain('--margin:1:1');
    expect(bad.err).toContain('`passband_dalay` is not a spec');
    const none = join(dir, 'novars.sbx');
    writeFileSync(none, readFileSync(join(root, 'circuits', 'pad-10db-pi.sbx'), 'utf8'));
    const nv = run(['fit', none]);
    expect(nv.code).toBe(3);
    expect(nv.err).toContain('has no design variables');
    expect(existsSync(out)).toBe(false);
  });
});

describe('--margin reader under fuzzing (fast-check, seed 1515)', () => {
  const specs = DesignModel.load(DEMO).circuit.specs;
  const words = ['1', '0.5 dB', '2 ns', 'passband_loss=', 'amplifier_vswr=0.1', '=', ' ', '\r\n', '1e308', '-1', 'dB', 'ohm', '(', ')', '__proto__=1', 'constructor=2', 'nosuch=1', '1 2', ',', '\u0000', 'é'];
  it('returns margins or throws an InputError located inside the texts', () => {
    fc.assert(
      fc.property(fc.array(fc.oneof(fc.string({ maxLength: 30 }), fc.array(fc.constantFrom(...words), { maxLength: 5 }).map((w) => w.join(''))), { minLength: 1, maxLength: 4 }), (texts) => {
        try {
          const m = parseMargins(texts, specs);
          expect(m.margin >= 0 && Number.isFinite(m.margin)).toBe(true);
          for (const x of m.specMargins.values()) expect(x >= 0 && Number.isFinite(x)).toBe(true);
        } catch (e) {
          if (!(e instanceof InputError)) throw e;
          expect(e.diagnostics.length).toBeGreaterThan(0);
          for (const d of e.diagnostics) {
            expect(d.span!.file).toBe('--margin');
            const line = texts[d.span!.line - 1];
            expect(line).toBeDefined();
            expect(d.span!.column).toBeGreaterThanOrEqual(1);
            expect(d.span!.column).toBeLessThanOrEqual(Math.max(1, line!.length + 1));
            expect(d.message).not.toMatch(/^[a-z]+[A-Z][A-Za-z0-9]*: /);
          }
        }
      }),
      { seed: 1515, numRuns: 400 },
    );
  });
});
