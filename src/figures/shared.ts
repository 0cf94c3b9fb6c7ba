/**
 * Checks and small helpers shared by the figure modules (not part of the public figure API).
 *
 * Port numbers in the figure API are 1-based, as in the name S21 (port 2 out, port 1 in); the storage
 * layout of {@link NetworkData} is 0-based, see {@link entryIndex}.
 *
 * @module
 */

import { convertNetwork } from '../network/convert.js';
import type { NetworkData } from '../network/types.js';

/** Checks the shape of `net` and returns the number of frequency points. Throws RangeError. */
export function checkShape(net: NetworkData, who: string): number {
  const n = net.ports;
  if (!Number.isInteger(n) || n < 1) throw new RangeError(`${who}: ports must be a positive integer, got ${n}`);
  const points = net.frequencies.length;
  if (net.values.length !== 2 * n * n * points) {
    throw new RangeError(
      `${who}: values has length ${net.values.length}, expected 2·${n}²·${points} = ${2 * n * n * points}`,
    );
  }
  if (net.references.length !== n) {
    throw new RangeError(`${who}: references has length ${net.references.length}, expected ${n}`);
  }
  return points;
}

/**
 * `net` itself if it holds S-parameters, otherwise its S-parameters for the same references, from
 * {@link convertNetwork} (which throws ConversionError where they do not exist). Allocates only for Z or Y.
 */
export function scattering(net: NetworkData, who: string): NetworkData {
  checkShape(net, who);
  return net.parameter === 'S' ? net : convertNetwork(net, 'S');
}

/** Throws RangeError unless `port` is an integer in 1..net.ports. */
export function checkPort(net: NetworkData, port: number, who: string): void {
  if (!Number.isInteger(port) || port < 1 || port > net.ports) {
    const count = `${net.ports} port${net.ports === 1 ? '' : 's'}`;
    throw new RangeError(`${who}: port ${port} is out of range, the network has ${count} (numbered from 1)`);
  }
}

/** Throws RangeError unless `net` is a two-port. */
export function checkTwoPort(net: NetworkData, who: string): void {
  if (net.ports !== 2) throw new RangeError(`${who}: needs a two-port, the network has ${net.ports} ports`);
}

/** `out` if given (its length must be `length`), otherwise a new zeroed array. */
export function outputArray(length: number, out: Float64Array | undefined, who: string): Float64Array {
  if (out === undefined) return new Float64Array(length);
  if (out.length !== length) throw new RangeError(`${who}: out has length ${out.length}, expected ${length}`);
  return out;
}
