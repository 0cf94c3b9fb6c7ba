/**
 * `scatterbox design` on the command line (the compiled CLI in dist/, built by `npm test`): the
 * written netlists pass `scatterbox check`, failing designs are not written, bad options get a
 * plain error naming the option; and the filter option readers under fuzzing.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { checkDesignText } from '../src/synth/index.js';
import { designFilter } from '../src/synth/lumped.js';
import { readFilterRequest } from '../src/synth/options.js';

const root = join(import.meta.dirname, '..');
const cli = join(root, 'bin', 'scatterbox.js');
const dir = mkdtempSync(join(tmpdir(), 'synth-cli-'));

function run(args: string[]) {
  const r = spawnSync(process.execPath, [cli, ...args], { cwd: dir, encoding: 'utf8' });
  return { code: r.status, out: r.stdout, err: r.stderr };
}

describe('scatterbox design', () => {
  const designs: [string, string[]][] = [
    ['cheby-lp.sbx', ['lowpass', '--response', 'chebyshev', '--ripple', '0.1', '--order', '5', '--cutoff', '600 MHz']],
    ['bw-hp.sbx', ['highpass', '--order', '4', '--cutoff', '30 MHz', '--first', 'series', '--z0', '75 ohm']],
    ['mask-bp.sbx', ['bandpass', '--response', 'chebyshev', '--ripple', '0.5', '--center', '2.44 GHz', '--bandwidth', '100 MHz', '--stop-atten', '30 dB', '--stop-edge', '2.2 GHz, 2.7 GHz']],
    ['bessel-bs.sbx', ['bandstop', '--response', 'bessel', '--order', '3', '--center', '100 MHz', '--bandwidth', '20 MHz']],
    ['even-cheby.sbx', ['lowpass', '--response', 'chebyshev', '--ripple', '0.5', '--order', '4', '--cutoff', '1 GHz']],
    ['lossy-bp.sbx', ['bandpass', '--response', 'chebyshev', '--order', '3', '--center', '915 MHz', '--bandwidth', '60 MHz', '--q', '80']],
    ['l.sbx', ['match', '--network', 'l-highpass', '--freq', '915 MHz', '--load', '30+20j ohm']],
    ['pi.sbx', ['match', '--network', 'pi', '--freq', '433.92 MHz', '--load', '12.5 ohm', '--loaded-q', '5']],
    ['stub.sbx', ['match', '--network', 'stub', '--stub', 'short', '--freq', '1575.42 MHz', '--load', '30+20j']],
    ['cheb-tx.sbx', ['match', '--network', 'chebyshev', '--sections', '3', '--freq', '1 GHz', '--load', '100 ohm', '--bandwidth', '600 MHz']],
  ];
  for (const [file, args] of designs) {
    it(`design ${args.join(' ')}: exit 0, a summary, and \`scatterbox check\` passes on the file`, () => {
      const r = run(['design', ...args, '-o', file]);
      expect(r.err).toBe('');
      expect(r.code).toBe(0);
      expect(r.out).toMatch(/pass/);
      expect(r.out).toMatch(new RegExp(`wrote ${file.replace('.', '\\.')}`));
      const c = run(['check', file]);
      expect(c.code).toBe(0);
      expect(c.out).toMatch(/all \d+ checks pass/);
    });
  }
  it('without -o prints the netlist on stdout and the summary on stderr', () => {
    const r = run(['design', 'lowpass', '--order', '3', '--cutoff', '1 GHz']);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/^# Butterworth low-pass, order 3/);
    expect(r.out).toMatch(/\nspec passband_loss measure=il\(2,1\) max=3\.0113\d* dB below=fc\n/);
    expect(r.err).toMatch(/passband_loss/);
  });
  it('a snapped design that misses its own specs exits 1 and writes nothing (unless --write-failing)', () => {
    // E6 is coarse: a 0.01 dB Chebyshev ripple cannot survive it
    const args = ['design', 'lowpass', '--response', 'chebyshev', '--ripple', '0.01', '--order', '7', '--cutoff', '1 GHz', '--series', 'E6'];
    const r = run([...args, '-o', 'snapped.sbx']);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/does not meet its own specs; snapped\.sbx was not written/);
    expect(existsSync(join(dir, 'snapped.sbx'))).toBe(false);
    const w = run([...args, '-o', 'snapped.sbx', '--write-failing']);
    expect(w.code).toBe(1);
    expect(readFileSync(join(dir, 'snapped.sbx'), 'utf8')).toMatch(/series E6/);
    expect(run(['check', 'snapped.sbx']).code).toBe(1);
  });
  it('a failed run leaves an existing file as it was', () => {
    writeFileSync(join(dir, 'keep.sbx'), 'old\n');
    const r = run(['design', 'lowpass', '--order', '12', '--cutoff', '1 GHz', '-o', 'keep.sbx']);
    expect(r.code).toBe(1);
    expect(readFileSync(join(dir, 'keep.sbx'), 'utf8')).toBe('old\n');
  });
  const bad: [string[], RegExp][] = [
    [['lowpass', '--order', '12', '--cutoff', '1 GHz'], /^error: --order must be a whole number from 1 to 10, not "12"/],
    [['lowpass', '--order', '3', '--cutoff', '1 GHz', '--first', 'middle'], /^error: --first is one of shunt, series/],
    [['lowpass', '--order', '3', '--cutoff', '5 pF'], /--cutoff:1:1: error: --cutoff must be in Hz, but it is a capacitance/],
    [['bandpass', '--order', '3', '--cutoff', '1 GHz'], /takes --center and --bandwidth, not --cutoff/],
    [['match', '--freq', '1 GHz', '--load', '30+20j', '--network', 'binomial', '--bandwidth', '100 MHz'], /--network binomial takes a resistive --load/],
  ];
  for (const [args, re] of bad) {
    it(`design ${args.join(' ')}: exit 1, ${re}`, () => {
      const r = run(['design', ...args]);
      expect(r.code).toBe(1);
      expect(r.err).toMatch(re);
      expect(r.err).not.toMatch(/internal error|at [a-zA-Z]+ \(/);
    });
  }
  it('an unknown kind is a usage error (2)', () => {
    expect(run(['design', 'allpass']).code).toBe(2);
  });
});

describe('fuzz: filter option readers', () => {
  it('random option values never crash: a plain error naming an option, or a netlist that passes its own check', () => {
    const freq = fc.oneof(fc.constantFrom('1 GHz', '600 MHz', '2.4e9', '0 Hz', '-1 GHz', '1e300', '5 pF', 'abc', '1 THz', '10 Hz', '(1', ''), fc.double({ min: 1, max: 1e12, noNaN: true }).map(String));
    const opt = <T>(a: fc.Arbitrary<T>) => fc.option(a, { nil: undefined });
    fc.assert(
      fc.property(
        fc.constantFrom('lowpass', 'highpass', 'bandpass', 'bandstop') as fc.Arbitrary<'lowpass' | 'highpass' | 'bandpass' | 'bandstop'>,
        fc.record({
          response: opt(fc.constantFrom('butterworth', 'chebyshev', 'bessel', 'CHEBYSHEV', 'elliptic', '')),
          order: opt(fc.oneof(fc.integer({ min: -2, max: 12 }).map(String), fc.constantFrom('3.5', 'x', '1e1', ' 4 '))),
          ripple: opt(fc.constantFrom('0.1', '0.01', '1 dB', '3', '5', '0', '-1', '1 ohm')),
          stopAtten: opt(fc.constantFrom('40', '20 dB', '0', '300', 'x')),
          stopEdge: opt(fc.oneof(freq, fc.tuple(freq, freq).map(([a, b]) => `${a}, ${b}`))),
          cutoff: opt(freq),
          center: opt(freq),
          bandwidth: opt(freq),
          z0: opt(fc.constantFrom('50', '75 ohm', '1 kohm', '0', '-50', '1e-9', '1 nH')),
          load: opt(fc.constantFrom('50', '100 ohm', '25', '1e7')),
          first: opt(fc.constantFrom('shunt', 'series', 'both')),
          series: opt(fc.constantFrom('E12', 'e24', 'E25')),
          q: opt(fc.constantFrom('50', '1e4', '0', 'x')),
        }),
        (kind, raw) => {
          const clean = Object.fromEntries(Object.entries(raw).filter(([, v]) => v !== undefined));
          try {
            const d = designFilter(readFilterRequest(kind, clean));
            const { pass } = checkDesignText(d.text, 'fuzz.sbx');
            // every unsnapped design passes its own specs; a snapped one is allowed to miss them
            if (clean.series === undefined) expect(pass).toBe(true);
          } catch (e) {
            const err = e as Error;
            expect(['DesignRequestError', 'InputError']).toContain(err.name);
            expect(err.message).toMatch(/--[a-z-]+|order|load|response/);
          }
        },
      ),
      { seed: 2121, numRuns: 300 },
    );
  });
});
