// Worker thread of the fuzz pool: loads the compiled library (dist/) and the engine, then judges
// the cases it is sent, one at a time. See pool.mjs.
import { parentPort, workerData } from 'node:worker_threads';
import { runCase } from './engine.mjs';

const lib = await import(workerData.libUrl);

parentPort.on('message', (msg) => {
  let outcome;
  try {
    outcome = runCase(lib, msg.c);
  } catch (e) {
    outcome = { status: 'crash', reason: `oracle failed: ${e && e.message}`, stack: e && e.stack };
  }
  parentPort.postMessage({ id: msg.id, outcome });
});
parentPort.postMessage({ ready: true });
