/**
 * `scatterbox design <kind> … -o design.sbx`: writes a first design as a netlist in our grammar
 * (comments, design variables with ranges, a sweep, specs that encode the request), prints a
 * summary, then loads, solves and checks what it wrote (as `scatterbox check` does) and exits 1
 * when its own specs do not pass. The file is written atomically, and only when the specs pass
 * (or with --write-failing, for a design to tune with `scatterbox fit`).
 *
 * Exit codes: 0 written and every spec passes, 1 a spec fails (or an option is wrong), 2 usage error.
 */
import type { Argv } from 'yargs';
import type { Io } from '../cli.js';
import { describeError, EXIT_INPUT, EXIT_OK } from '../cli.js';
import { writeFileAtomicSync } from '../../src/io/atomic.js';
import { checkOutputs } from '../../src/io/guard.js';
import { formatSpecTable } from '../../src/check/report.js';
import { checkDesignText, designAnyFilter } from '../../src/synth/index.js';
import { readFilterRequest } from '../../src/synth/options.js';
import { designMatch, readMatchRequest } from '../../src/synth/match.js';

export const DESIGN_KINDS = ['lowpass', 'highpass', 'bandpass', 'bandstop', 'match'] as const;

export interface DesignArgs {
  kind: (typeof DESIGN_KINDS)[number];
  out?: string;
  writeFailing: boolean;
  quiet: boolean;
  [option: string]: unknown;
}

export function designBuilder(y: Argv): Argv {
  return y
    .positional('kind', { choices: DESIGN_KINDS, describe: 'what to design: a lumped filter, or a matching network', demandOption: true })
    .option('out', { alias: 'o', type: 'string', describe: 'the netlist to write (.sbx); without it the netlist is printed' })
    .option('response', { type: 'string', describe: 'filters: butterworth (default), chebyshev, bessel or elliptic (low-pass and high-pass, odd orders, with --stop-edge)' })
    .option('order', { type: 'string', describe: 'filters: the order, 1 to 10 (or give a mask: --stop-atten and --stop-edge)' })
    .option('ripple', { type: 'string', describe: 'Chebyshev and elliptic: pass-band ripple in dB (default 0.1)' })
    .option('stop-atten', { type: 'string', describe: 'filters: attenuation to reach at the stop edges, dB (with --stop-edge: the least order that does)' })
    .option('stop-edge', { type: 'string', array: true, describe: 'filters: stop-band edge frequencies, comma-separated' })
    .option('cutoff', { type: 'string', describe: 'low-pass, high-pass: the cutoff (Chebyshev: the ripple edge; Butterworth and Bessel: the 3 dB point)' })
    .option('center', { type: 'string', describe: 'band-pass, band-stop: the centre frequency (geometric)' })
    .option('bandwidth', { type: 'string', describe: 'band-pass, band-stop: the width between the band edges; match: the band of a multi-section transformer' })
    .option('z0', { type: 'string', describe: 'source (and line) impedance, default 50 ohm' })
    .option('load', { type: 'string', describe: 'filters: the load resistance (default: equal to --z0); match: the load impedance, e.g. "30+20j ohm"' })
    .option('first', { type: 'string', describe: 'filters: the first arm, shunt (default) or series' })
    .option('series', { type: 'string', describe: 'snap the part values to an IEC 60063 series (E6 … E192) and check again' })
    .option('q', { type: 'string', describe: 'unloaded Q of every inductor and capacitor (default: lossless parts)' })
    .option('realize', { type: 'string', describe: 'filters: lumped (default), stubs (low-pass: Richards\' transformation and Kuroda\'s identities), stepped (low-pass: stepped impedance) or coupled-lines (band-pass: Cohn\'s parallel-coupled lines)' })
    .option('high-z', { type: 'string', describe: 'stepped-impedance low-pass: the high line impedance (default 2.4·z0, 120 ohm at 50 ohm)' })
    .option('low-z', { type: 'string', describe: 'stepped-impedance low-pass: the low line impedance (default 0.4·z0, 20 ohm at 50 ohm)' })
    .option('network', { type: 'string', describe: 'match: l-lowpass (default), l-highpass, pi, tee, stub, double-stub, quarter-wave, binomial, chebyshev' })
    .option('freq', { type: 'string', describe: 'match: the frequency to match at' })
    .option('load-file', { type: 'string', describe: 'match: a one-port data file (.s1p or .json) holding the load over a band' })
    .option('band', { type: 'string', describe: 'match with --load-file: the band to check, two frequencies, e.g. "2.4 GHz, 2.5 GHz" (matched at its geometric centre unless --freq)' })
    .option('min-return-loss', { type: 'string', describe: 'match with --load-file: the return loss to reach over --band, dB (default 10)' })
    .option('loaded-q', { type: 'string', describe: 'match, pi and tee: the loaded Q of the network' })
    .option('sections', { type: 'string', describe: 'match, binomial and chebyshev: the number of quarter-wave sections, 1 to 8' })
    .option('stub', { type: 'string', describe: 'match, stub and double-stub: open (default) or short' })
    .option('write-failing', { type: 'boolean', default: false, describe: 'write the netlist even when its specs fail (to tune it with `scatterbox fit`)' })
    .option('quiet', { type: 'boolean', default: false, describe: 'print only errors' })
    .example('$0 design lowpass --response chebyshev --ripple 0.1 --order 5 --cutoff "600 MHz" -o lpf.sbx', 'a 5th-order Chebyshev low-pass')
    .example('$0 design bandpass --center "2.44 GHz" --bandwidth "200 MHz" --stop-atten 30 --stop-edge "2.1 GHz" -o bpf.sbx', 'the least Butterworth order for a mask')
    .example('$0 design match --network l-lowpass --freq "915 MHz" --load "75 ohm" -o match.sbx', 'an L-section match')
    .epilog('Exit codes: 0 written and every spec passes, 1 a spec fails or an option is wrong, 2 usage error.');
}

export function runDesign(a: DesignArgs, io: Io): number {
  try {
    checkOutputs([a.out], []);
    const file = a.out ?? `design-${a.kind}.sbx`;
    const d = a.kind === 'match' ? designMatch(readMatchRequest(a), file) : designAnyFilter(readFilterRequest(a.kind, a));
    const { pass, results } = checkDesignText(d.text, file);
    // the summary goes to stdout, unless the netlist itself does (no -o)
    const say = a.out ? io.out : io.err;
    if (!a.quiet) say(`${d.summary}\n${formatSpecTable(results)}`);
    if (!pass) {
      io.err(
        `the design does not meet its own specs${a.out && !a.writeFailing ? `; ${a.out} was not written (--write-failing writes it anyway, e.g. to tune it with \`scatterbox fit\`)` : ''}\n`,
      );
    }
    if (a.out && (pass || a.writeFailing)) {
      writeFileAtomicSync(a.out, d.text);
      if (!a.quiet) say(`wrote ${a.out}\n`);
    } else if (!a.out) io.out(d.text);
    return pass ? EXIT_OK : EXIT_INPUT;
  } catch (e) {
    io.err(describeError(e, false) + '\n');
    return EXIT_INPUT;
  }
}
