// A pool of worker processes (child processes, so that a fatal V8 error such as an invalid array
// size aborts only the worker) that judge fuzz cases with a watchdog: a case that runs longer
// than `timeoutMs` is a hang; its worker is killed and replaced. A worker that dies (out of
// memory, a native abort) gives a crash outcome for its case and is replaced too.
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join, relative } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { fork } from 'node:child_process';

const WORKER = fileURLToPath(new URL('./worker.mjs', import.meta.url));

/**
 * The demo netlists and every file under `root` (circuits/): texts by path relative to `root`.
 * @returns {{ netlists: string[], data: string[], files: Record<string, string> }}
 */
export function loadCorpus(root) {
  const files = {};
  const walk = (dir) => {
    for (const name of readdirSync(dir).sort()) {
      const p = join(dir, name);
      if (statSync(p).isDirectory()) walk(p);
      else files[relative(root, p).split('\\').join('/')] = readFileSync(p, 'utf8');
    }
  };
  walk(root);
  const keys = Object.keys(files);
  return {
    netlists: keys.filter((k) => !k.includes('/') && k.endsWith('.sbx')),
    data: keys.filter((k) => /\.(s\d+p|json)$/i.test(k)),
    files,
  };
}

export class FuzzPool {
  /**
   * @param {{ libPath: string, workers?: number, timeoutMs?: number, memoryMb?: number }} options
   * libPath: the compiled library's entry (dist/src/index.js)
   */
  constructor(options) {
    this.libUrl = pathToFileURL(options.libPath).href;
    this.timeoutMs = options.timeoutMs ?? 2000;
    this.memoryMb = options.memoryMb ?? 2048;
    this.slots = Array.from({ length: options.workers ?? 2 }, () => ({ worker: null, ready: null, busy: false }));
    this.queue = [];
    this.nextId = 0;
  }

  start(slot) {
    const worker = fork(WORKER, [this.libUrl], {
      serialization: 'advanced',
      execArgv: [`--max-old-space-size=${this.memoryMb}`],
      stdio: ['ignore', 'ignore', 'pipe', 'ipc'],
    });
    // The last lines a dying worker wrote (a V8 fatal error names its cause there).
    worker.tail = '';
    worker.stderr.on('data', (d) => (worker.tail = (worker.tail + d).slice(-2000)));
    slot.worker = worker;
    slot.ready = new Promise((resolve, reject) => {
      const onMessage = (m) => {
        if (m && m.ready) {
          worker.off('message', onMessage);
          worker.off('error', reject);
          resolve();
        }
      };
      worker.on('message', onMessage);
      worker.once('error', reject);
      worker.once('exit', (code) => reject(new Error(`the worker exited at start (code ${code}): ${worker.tail}`)));
    });
    // A worker that died between cases is replaced at its next use.
    worker.once('exit', () => {
      if (slot.worker === worker) slot.worker = null;
    });
    return slot.ready;
  }

  /**
   * Judges one case; resolves to an outcome ({ status: 'hang' } past the watchdog).
   * @returns {Promise<{ status: string, reason: string, message?: string, stack?: string, ms: number }>}
   */
  run(c) {
    return new Promise((resolve) => {
      this.queue.push({ c, resolve });
      this.pump();
    });
  }

  pump() {
    for (const slot of this.slots) {
      if (slot.busy || this.queue.length === 0) continue;
      const job = this.queue.shift();
      slot.busy = true;
      this.dispatch(slot, job).then((outcome) => {
        slot.busy = false;
        job.resolve(outcome);
        this.pump();
      });
    }
  }

  async dispatch(slot, job) {
    if (!slot.worker) {
      try {
        await this.start(slot);
      } catch (e) {
        slot.worker = null;
        return { status: 'crash', reason: `worker failed to start: ${e.message}`, ms: 0 };
      }
    } else await slot.ready;
    const worker = slot.worker;
    const id = this.nextId++;
    const t0 = performance.now();
    return new Promise((resolve) => {
      let done = false;
      const finish = (outcome, kill) => {
        if (done) return;
        done = true;
        clearTimeout(timer);
        worker.off('message', onMessage);
        worker.off('error', onError);
        worker.off('exit', onExit);
        if (kill) {
          slot.worker = null;
          worker.kill('SIGKILL');
        }
        resolve({ ...outcome, ms: Math.round(performance.now() - t0) });
      };
      const onMessage = (m) => {
        if (m && m.id === id) finish(m.outcome, false);
      };
      const onError = (e) => finish({ status: 'crash', reason: `worker failed: ${e && e.message}`, stack: e && e.stack }, true);
      const onExit = (code, signal) => {
        // Give the worker's stderr a moment to arrive, then name the cause from it.
        setTimeout(() => {
          const tail = worker.tail ?? '';
          const fatal = /Fatal (?:JavaScript )?(.*)|(heap out of memory)|(Maximum call stack)/i.exec(tail);
          const cause = fatal ? (fatal[1] ?? fatal[2] ?? fatal[3]).replace(/\d+/g, 'N').trim() : `exit code ${code}, signal ${signal}`;
          finish({ status: 'crash', reason: `process aborted: ${cause}`, stack: tail.split('\n').slice(0, 12).join('\n') }, true);
        }, 50);
      };
      // When the timer fires, the answer may already be waiting in the pipe: this process may have
      // been busy itself (building a large case) while the worker ran. Messages that arrived are
      // delivered before setImmediate's callback, so only a worker still at work is a hang; and a
      // timer that fired late by more than the budget is given the budget again, from now.
      const arm = (ms) =>
        setTimeout(() => {
          const late = performance.now() - t0 - this.timeoutMs;
          setImmediate(() => {
            if (done) return;
            if (late > this.timeoutMs && !rearmed) {
              rearmed = true;
              timer = arm(this.timeoutMs);
              return;
            }
            finish({ status: 'hang', reason: `no result within ${this.timeoutMs} ms` }, true);
          });
        }, ms);
      let rearmed = false;
      let timer = arm(this.timeoutMs);
      worker.on('message', onMessage);
      worker.on('error', onError);
      worker.on('exit', onExit);
      worker.send({ id, c: job.c });
    });
  }

  async close() {
    for (const s of this.slots) if (s.worker) s.worker.kill('SIGKILL');
    this.slots.forEach((s) => (s.worker = null));
  }
}
