/**
 * `scatterbox live <netlist>`: serves the netlist's report as a live page on 127.0.0.1 (a free
 * port, or --port) at an address with a random token, re-solves when the netlist or one of its
 * included or data files is saved, and tunes the design variables with sliders (src/live/).
 * Opens a browser only with --open. Runs until Ctrl-C.
 *
 * Exit codes: 0 stopped by Ctrl-C, 1 the server could not start (port taken…).
 */
import { spawn } from 'node:child_process';
import { existsSync } from 'node:fs';
import type { Argv } from 'yargs';
import type { Io } from '../cli.js';
import { EXIT_INPUT, EXIT_OK } from '../cli.js';
import { startLive } from '../../src/live/server.js';

export interface LiveArgs {
  netlist: string;
  port: number;
  open: boolean;
  quiet: boolean;
}

export function liveBuilder(y: Argv): Argv {
  return y
    .positional('netlist', { type: 'string', describe: 'netlist file (.sbx); its design variables get sliders', demandOption: true })
    .option('port', { type: 'number', default: 0, describe: 'the port on 127.0.0.1 (0: a free one)' })
    .option('open', { type: 'boolean', default: false, describe: 'open the page in the default browser' })
    .option('quiet', { alias: 'q', type: 'boolean', default: false, describe: 'print only the address and errors' })
    .check((argv) => {
      const p = argv.port;
      if (Array.isArray(p)) throw new Error('--port is given more than once');
      if (typeof p !== 'number' || !Number.isInteger(p) || p < 0 || p > 65535) throw new Error(`--port must be a whole number from 0 to 65535, got ${String(p)}`);
      return true;
    })
    .example('$0 live circuits/match-50-75-915.sbx', 'serve the live page; open the printed address')
    .example('$0 live circuits/bandpass-2g4.sbx --port 8123 --open', 'a fixed port, and open the browser')
    .epilog('The page is served on 127.0.0.1 only, at an address with a random token; stop with Ctrl-C.');
}

/** Opens a URL in the default browser, where there is one (errors are only reported). */
function openBrowser(url: string, io: Io): void {
  const [cmd, args] = process.platform === 'darwin' ? ['open', [url]] : process.platform === 'win32' ? ['cmd', ['/c', 'start', '', url]] : ['xdg-open', [url]];
  try {
    const child = spawn(cmd, args, { stdio: 'ignore', detached: true });
    child.on('error', () => io.err(`could not open a browser (${cmd}); open the address above yourself\n`));
    child.unref();
  } catch {
    io.err('could not open a browser; open the address above yourself\n');
  }
}

export async function runLive(a: LiveArgs, io: Io): Promise<number> {
  if (!existsSync(a.netlist)) {
    io.err(`error: ${a.netlist}: no such file\n`);
    return EXIT_INPUT;
  }
  let live;
  try {
    live = await startLive({ netlist: a.netlist, port: a.port, log: a.quiet ? undefined : (line) => io.err(`${line}\n`) });
  } catch (e) {
    const err = e as NodeJS.ErrnoException;
    const why = err.code === 'EADDRINUSE' ? `port ${a.port} is taken` : err.code === 'EACCES' ? `port ${a.port} needs other rights` : err.message;
    io.err(`error: could not start the live server: ${why}\n  help: give another --port, or none for a free one\n`);
    return EXIT_INPUT;
  }
  io.out(`${live.url}\n`);
  if (!a.quiet) io.err(`live page of ${a.netlist} on 127.0.0.1:${live.port}; watching its files; Ctrl-C stops\n`);
  if (a.open) openBrowser(live.url, io);
  await new Promise<void>((done) => {
    const stop = () => {
      process.off('SIGINT', stop);
      process.off('SIGTERM', stop);
      void live.close().then(() => {
        io.err('stopped\n');
        done();
      });
    };
    process.on('SIGINT', stop);
    process.on('SIGTERM', stop);
  });
  return EXIT_OK;
}
