/**
 * Checks and small helpers shared by the figure modules (not part of the public figure API).
 *
 * Port numbers in the figure API are 1-based, as in the name S21 (port 2 out, port 1 in); the storage
 * layout of {@link NetworkData} is 0-based, see {@link entryIndex}.
 *
 * Messages say what is wrong in plain words; none names a function of ours.
 *
 * @module
 */

import { convertNetwork } from '../network/convert.js';
import type { NetworkData } from '../network/types.js';

/** Checks the shape of `net` and returns the number of frequency points. Throws RangeError. */
export function checkShape(net: NetworkData): number {
  const n = net.ports;
  if (!Number.isInteger(n) || n < 1) throw new RangeError(`the network's port count must be a positive integer, got ${n}`);
  const points = net.frequencies.length;
  if (net.values.length !== 2 * n * n * points) {
    throw new RangeError(
      `the network holds ${net.values.length} numbers, expected 2·${n}²·${points} = ${2 * n * n * points} for ${n} port${n === 1 ? '' : 's'} and ${points} point${points === 1 ? '' : 's'}`,
    );
  }
  if (net.references.length !== n) {
    throw new RangeError(`the network has ${net.references.length} reference impedances for ${n} port${n === 1 ? '' : 's'}`);
  }
  return points;
}

/**
 * `net` itself if it holds S-parameters, otherwise its S-parameters for the same references, from
 * {@link convertNetwork} (which throws ConversionError where they do not exist). Allocates only for Z or Y.
 */
export function scattering(net: NetworkData): NetworkData {
  checkShape(net);
  return net.parameter === 'S' ? net : convertNetwork(net, 'S');
}

/** Throws RangeError unless `port` is an integer in 1..net.ports. */
export function checkPort(net: NetworkData, port: number): void {
  if (!Number.isInteger(port) || port < 1 || port > net.ports) {
    const count = `${net.ports} port${net.ports === 1 ? '' : 's'}`;
    throw new RangeError(`port ${port} is out of range, the network has ${count} (numbered from 1)`);
  }
}

/** Throws RangeError unless `net` is a two-port. */
export function checkTwoPort(net: NetworkData): void {
  if (net.ports !== 2) throw new RangeError(`this figure needs a two-port, the network has ${net.ports} port${net.ports === 1 ? '' : 's'}`);
}

/** `out` if given (its length must be `length`), otherwise a new zeroed array. */
export function outputArray(length: number, out: Float64Array | undefined): Float64Array {
  if (out === undefined) return new Float64Array(length);
  if (out.length !== length) throw new RangeError(`the output array has length ${out.length}, expected ${length}`);
  return out;
}
