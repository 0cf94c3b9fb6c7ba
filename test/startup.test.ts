// The libraries a command-line run loads first, from their single-file builds: the same versions
// as the installed packages (a check on the loaders in src/parse/chevrotain.ts and
// src/elaborate/evaluate.ts, which exist only to shorten the start of every run).
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import * as treeMath from 'mathjs';
import { grammarLibrary } from '../src/parse/chevrotain.js';
import { math } from '../src/elaborate/evaluate.js';
import { loadNetlist } from '../src/load.js';

const require = createRequire(import.meta.url);
const versionOf = (pkg: string) => (JSON.parse(readFileSync(require.resolve(`${pkg}/package.json`), 'utf8')) as { version: string }).version;

describe('libraries loaded from their single-file builds', () => {
  it('the grammar library comes from its single file, at the installed version', () => {
    // chevrotain's package.json has no export for package.json: read it beside the entry point
    const entry = require.resolve('chevrotain');
    const pkg = JSON.parse(readFileSync(entry.replace(/lib[\\/]src[\\/]api\.js$/, 'package.json'), 'utf8')) as { version: string };
    expect(grammarLibrary.from).toBe('single file');
    expect(grammarLibrary.version).toBe(pkg.version);
  });

  it('mathjs is the installed version and evaluates units as the module tree does', () => {
    expect(math.version).toBe(versionOf('mathjs'));
    // the same quantities through the package's module tree (mathjs itself as the reference)
    for (const text of ['12 nH', '4.7 pF * 2', '50 ohm / 3', 'sqrt(2) * 1 GHz', '10^(-3/20)']) {
      const a = math.evaluate(text);
      const b = treeMath.evaluate(text);
      expect(String(a), text).toBe(String(b));
    }
  });

  it('a netlist parses and elaborates through them', () => {
    const { circuit, warnings } = loadNetlist('let l = 12 nH\ninductor l1 a=in b=ground value=l\nport 1 plus=in\nsweep list freqs=1 GHz\n', 'tiny.sbx');
    expect(warnings).toEqual([]);
    expect(circuit.elements).toHaveLength(1);
    // 12 nH in henries, as the package's module tree converts it
    expect(circuit.elements[0]!.props.value).toBe((treeMath.evaluate('12 nH') as treeMath.Unit).toNumber('H'));
  });
});
