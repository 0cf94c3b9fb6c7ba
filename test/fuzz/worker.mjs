// Child process of the fuzz pool: loads the compiled library (dist/) and the engine, then judges
// the cases it is sent, one at a time. A process rather than a worker thread, so that a fatal
// V8 error (an abort) of the library takes down only this child. See pool.mjs.
import { runCase } from './engine.mjs';

const lib = await import(process.argv[2]);

process.on('message', (msg) => {
  let outcome;
  try {
    outcome = runCase(lib, msg.c);
  } catch (e) {
    outcome = { status: 'crash', reason: `oracle failed: ${e && e.message}`, stack: e && e.stack };
  }
  process.send({ id: msg.id, outcome });
});
process.send({ ready: true });
