// Delta debugging (Zeller & Hildebrandt 2002, "Simplifying and isolating failure-inducing input",
// the ddmin complement-removal scheme): shrinks a failing text, first by lines, then by tokens,
// while `still(text)` says the failure is still the same one.
import { splitLines } from './engine.mjs';

/**
 * @param {string} text
 * @param {(text: string) => Promise<boolean>} still
 * @param {number} budget most calls of `still`
 * @returns {Promise<string>}
 */
export async function minimizeText(text, still, budget = 200) {
  const left = { n: budget };
  let units = splitLines(text);
  units = await ddmin(units, still, left);
  units = await ddmin(units.join('').match(/\s+|[^\s]+/g) ?? [], still, left);
  units = await ddmin([...units.join('')], still, left);
  return units.join('');
}

async function ddmin(units, still, left) {
  let n = 2;
  while (units.length >= 2 && left.n > 0) {
    const size = Math.ceil(units.length / n);
    let reduced = false;
    for (let start = 0; start < units.length && left.n > 0; start += size) {
      const candidate = units.slice(0, start).concat(units.slice(start + size));
      left.n--;
      if (await still(candidate.join(''))) {
        units = candidate;
        n = Math.max(n - 1, 2);
        reduced = true;
        break;
      }
    }
    if (!reduced) {
      if (n >= units.length) break;
      n = Math.min(units.length, n * 2);
    }
  }
  if (units.length === 1 && left.n > 0) {
    left.n--;
    if (await still('')) return [];
  }
  return units;
}
