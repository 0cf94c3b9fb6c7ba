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
import { checkDesignText, designAnyFilter } from '../src/synth/index.js';
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
    ['stubs.sbx', ['lowpass', '--realize', 'stubs', '--response', 'chebyshev', '--ripple', '0.5', '--order', '3', '--first', 'series', '--cutoff', '4 GHz']],
    ['coupled.sbx', ['bandpass', '--realize', 'coupled-lines', '--response', 'chebyshev', '--ripple', '0.5', '--order', '3', '--center', '2 GHz', '--bandwidth', '200 MHz']],
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
    let designed = 0;
    const freq = fc.oneof(fc.constantFrom('1 GHz', '600 MHz', '2.4e9', '0 Hz', '-1 GHz', '1e300', '5 pF', 'abc', '1 THz', '10 Hz', '(1', ''), fc.double({ min: 1, max: 1e12, noNaN: true }).map(String));
    const junk = fc.oneof(freq, fc.constantFrom('x', '', '0', '-1', '1e999', '3.5', 'E25', 'e24', 'both', '40 dB', '__proto__', '11', '3 dB', 'stubs', 'coupled-lines', 'lumped', 'stepped', '100 ohm', 'elliptic'), fc.string({ maxLength: 8 }));
    const keys = ['realize', 'highZ', 'lowZ', 'response', 'order', 'ripple', 'stopAtten', 'stopEdge', 'cutoff', 'center', 'bandwidth', 'z0', 'load', 'first', 'series', 'q'];
    // a valid request of each kind, then up to three of its options replaced, removed or added at random
    const valid = fc
      .record({
        kind: fc.constantFrom('lowpass', 'highpass', 'bandpass', 'bandstop') as fc.Arbitrary<'lowpass' | 'highpass' | 'bandpass' | 'bandstop'>,
        response: fc.constantFrom('butterworth', 'chebyshev', 'bessel'),
        order: fc.integer({ min: 1, max: 10 }),
        f: fc.double({ min: 1e3, max: 1e10, noNaN: true }),
        frac: fc.double({ min: 0.01, max: 0.8, noNaN: true }),
        first: fc.constantFrom('shunt', 'series'),
        z0: fc.constantFrom('50', '75 ohm', '1 kohm', '10'),
      })
      .map(({ kind, response, order, f, frac, first, z0 }) => {
        const raw: Record<string, string> = { response, order: String(order), first, z0 };
        if (kind === 'lowpass' || kind === 'highpass') raw.cutoff = `${f} Hz`;
        else Object.assign(raw, { center: `${f} Hz`, bandwidth: `${f * frac} Hz` });
        if (response === 'chebyshev') raw.ripple = '0.5';
        return { kind, raw };
      });
    const edits = fc.array(fc.tuple(fc.constantFrom(...keys), fc.option(junk, { nil: undefined })), { maxLength: 3 });
    fc.assert(
      fc.property(valid, edits, ({ kind, raw: base }, changes) => {
        const raw: Record<string, string> = { ...base };
        for (const [k, v] of changes) {
          if (v === undefined) delete raw[k];
          else raw[k] = v;
        }
        try {
          const d = designAnyFilter(readFilterRequest(kind, raw));
          const { pass } = checkDesignText(d.text, 'fuzz.sbx');
          designed++;
          // every unsnapped design passes its own specs; a snapped one may miss them (the CLI then exits 1)
          if (raw.series === undefined) expect(pass).toBe(true);
        } catch (e) {
          const err = e as Error;
          expect(['DesignRequestError', 'InputError']).toContain(err.name);
          expect(err.message).toMatch(/--[a-z-]+|order|load|response/);
          expect(err.message).not.toMatch(/^[a-z]+[A-Z]\w*:/); // never an internal function's name
        }
      }),
      { seed: 2121, numRuns: 300 },
    );
    // the generator reaches real designs, not only errors
    expect(designed).toBeGreaterThan(50);
  });
});
