/**
 * Fill-reducing ordering: approximate minimum degree on a symmetric graph.
 *
 * Method: P. R. Amestoy, T. A. Davis, I. S. Duff, "An approximate minimum degree ordering
 * algorithm", SIAM J. Matrix Anal. Appl. 17(4), 1996. This is our own implementation written from
 * the published description (details from memory), with these parts of the method:
 *
 * - the quotient graph: eliminated variables become *elements*; each remaining variable i keeps a
 *   list of the elements it touches (E_i) and of the variables it is still directly joined to
 *   (A_i); each element e keeps its variable list L_e;
 * - eliminating the pivot p forms the new element L_p = (A_p ∪ ⋃_{e∈E_p} L_e) \ {p} and absorbs
 *   every element of E_p into it (element absorption);
 * - approximate external degrees: for i ∈ L_p,
 *     d_i ← min(n − k, d_i + |L_p \ i|, |A_i \ i| + |L_p \ i| + Σ_{e∈E_i\p} |L_e \ L_p|),
 *   with |L_e \ L_p| found for all e at once by one pass over L_p;
 * - aggressive absorption: an element e with L_e ⊆ L_p is absorbed into p as well;
 * - supervariables: variables of L_p with identical lists (found by hashing, then compared) are
 *   merged and carried on as one weighted variable (indistinguishable nodes);
 * - mass elimination: a variable whose only neighbour is the new element is eliminated with p;
 * - dense rows: variables of degree above max(16, 10·√n) are held back and ordered last (the
 *   10·√n threshold as recalled from the paper's code, from memory);
 * - ties between variables of the same degree are broken first-in first-out (our choice; see the
 *   degree lists below).
 *
 * Not done (the ordering is still valid, only possibly a little worse or slower than the full
 * method): the post-ordering of the assembly tree, and in-place construction of L_p when E_p is
 * empty (we always append new elements at the end of the work array and compact it when full).
 *
 * Runs once per circuit, so it may allocate freely.
 *
 * @module
 */

/** Status of a node of the quotient graph. */
const VARIABLE = 0;
const ELEMENT = 1;
const GONE = 2;
const DENSE = 3;

/**
 * Approximate minimum degree ordering of the symmetric graph given as adjacency lists
 * (`adjStart` of length n+1, `adj` the neighbours; self loops and duplicates are allowed and ignored;
 * the lists must be symmetric: j in the list of i if and only if i in the list of j).
 *
 * Returns `order`, with `order[k]` the vertex eliminated k-th.
 */
export function approximateMinimumDegree(n: number, adjStart: Int32Array, adj: Int32Array): Int32Array {
  const order = new Int32Array(n);
  if (n === 0) return order;

  // --- copy the graph into the work pool, dropping self loops and duplicates -----------------
  const listStart = new Int32Array(n);
  const listLen = new Int32Array(n);
  const elemLen = new Int32Array(n);
  let total = 0;
  for (let i = 0; i < n; i++) total += adjStart[i + 1]! - adjStart[i]!;
  let cap = 2 * total + 4 * n + 64;
  let pool = new Int32Array(cap);
  let poolEnd = 0;
  const seen = new Int32Array(n).fill(-1);
  for (let i = 0; i < n; i++) {
    listStart[i] = poolEnd;
    for (let t = adjStart[i]!; t < adjStart[i + 1]!; t++) {
      const j = adj[t]!;
      if (j === i || seen[j] === i) continue;
      seen[j] = i;
      pool[poolEnd++] = j;
    }
    listLen[i] = poolEnd - listStart[i]!;
  }

  const kind = new Uint8Array(n);
  const weight = new Int32Array(n).fill(1); // supervariable size; for elements, the pivot's size
  const degree = new Int32Array(n); // variables: approximate external degree; elements: Σ weight of L_e
  const joinedTo = new Int32Array(n).fill(-1); // absorbed variable -> variable or pivot it went with
  const elimStep = new Int32Array(n).fill(-1); // pivot -> its elimination step
  const setDiff = new Float64Array(n); // w(e) of the paper, offset by `wMark`
  let wMark = 1;
  const inLp = new Int32Array(n).fill(-1); // inLp[i] === step: i ∈ L_p (or i = p)
  const cmpMark = new Int32Array(n).fill(-1);
  let cmpStamp = 0;
  const hashOf = new Int32Array(n);
  const hashHead = new Int32Array(n).fill(-1);
  const hashNext = new Int32Array(n);
  const saved = new Int32Array(n);

  // Degree buckets: doubly linked lists, first in first out. Ties between variables of equal degree
  // go to the one waiting longest; on a chain this eliminates from both ends in turn (two
  // independent elimination chains instead of one long one, which halves the dependency depth of
  // factor and solve), and the fill is the same.
  const bucketHead = new Int32Array(n + 1).fill(-1);
  const bucketTail = new Int32Array(n + 1).fill(-1);
  const next = new Int32Array(n).fill(-1);
  const prev = new Int32Array(n).fill(-1);
  let minDeg = 0;
  const insert = (i: number, d: number): void => {
    const t = bucketTail[d]!;
    prev[i] = t;
    next[i] = -1;
    if (t >= 0) next[t] = i;
    else bucketHead[d] = i;
    bucketTail[d] = i;
    if (d < minDeg) minDeg = d;
  };
  const remove = (i: number): void => {
    const a = prev[i]!;
    const b = next[i]!;
    const d = degree[i]!;
    if (a >= 0) next[a] = b;
    else bucketHead[d] = b;
    if (b >= 0) prev[b] = a;
    else bucketTail[d] = a;
    next[i] = -1;
    prev[i] = -1;
  };

  // --- dense rows are held back ------------------------------------------------------------
  const denseLimit = Math.max(16, Math.floor(10 * Math.sqrt(n)));
  let live = n;
  for (let i = 0; i < n; i++) {
    if (listLen[i]! > denseLimit) {
      kind[i] = DENSE;
      live--;
    }
  }
  for (let i = 0; i < n; i++) {
    if (kind[i] !== VARIABLE) continue;
    let d = 0;
    const s = listStart[i]!;
    for (let t = 0; t < listLen[i]!; t++) if (kind[pool[s + t]!] === VARIABLE) d++;
    degree[i] = d;
  }
  minDeg = n;
  for (let i = 0; i < n; i++) if (kind[i] === VARIABLE) insert(i, degree[i]!);

  // Moves every live list to the front of the pool, in pool order. The first entry of each list
  // is replaced by a marker −(i+1) so that the lists can be found in one scan.
  const compact = (): void => {
    for (let i = 0; i < n; i++) {
      const k = kind[i];
      if ((k === VARIABLE || k === ELEMENT) && listLen[i]! > 0) {
        saved[i] = pool[listStart[i]!]!;
        pool[listStart[i]!] = -(i + 1);
      }
    }
    let dst = 0;
    let src = 0;
    while (src < poolEnd) {
      const v = pool[src]!;
      if (v >= 0) {
        src++;
        continue;
      }
      const i = -v - 1;
      const len = listLen[i]!;
      listStart[i] = dst;
      pool[dst++] = saved[i]!;
      for (let t = 1; t < len; t++) pool[dst++] = pool[src + t]!;
      src += len;
    }
    poolEnd = dst;
  };

  let eliminated = 0; // total weight eliminated so far
  let step = 0;
  const pivots = new Int32Array(n);
  let nPivots = 0;

  while (eliminated < live) {
    // --- pick the pivot of least approximate degree ------------------------------------------
    while (minDeg < n && bucketHead[minDeg]! < 0) minDeg++;
    const p = bucketHead[minDeg]!;
    remove(p);
    const pWeight = weight[p]!;
    eliminated += pWeight;
    elimStep[p] = nPivots;
    pivots[nPivots++] = p;
    step++;
    inLp[p] = step;

    // --- form L_p -----------------------------------------------------------------------------
    let need = listLen[p]!;
    for (let t = 0; t < elemLen[p]!; t++) {
      const e = pool[listStart[p]! + t]!;
      if (kind[e] === ELEMENT) need += listLen[e]!;
    }
    if (poolEnd + need > cap) {
      compact();
      if (poolEnd + need > cap || cap - poolEnd < (cap >> 2)) {
        cap = Math.max(2 * cap, poolEnd + need + n);
        const bigger = new Int32Array(cap);
        bigger.set(pool.subarray(0, poolEnd));
        pool = bigger;
      }
    }
    const lpStart = poolEnd;
    let degMe = 0;
    {
      const ps = listStart[p]!;
      const pe = elemLen[p]!;
      const pl = listLen[p]!;
      for (let t = 0; t < pl; t++) {
        const node = pool[ps + t]!;
        if (t < pe) {
          if (kind[node] !== ELEMENT) continue;
          const es = listStart[node]!;
          const el = listLen[node]!;
          for (let u = 0; u < el; u++) {
            const v = pool[es + u]!;
            if (kind[v] !== VARIABLE || inLp[v] === step) continue;
            inLp[v] = step;
            pool[poolEnd++] = v;
            degMe += weight[v]!;
            remove(v);
          }
          kind[node] = GONE; // absorbed into p
        } else {
          const v = node;
          if (kind[v] !== VARIABLE || inLp[v] === step) continue;
          inLp[v] = step;
          pool[poolEnd++] = v;
          degMe += weight[v]!;
          remove(v);
        }
      }
    }
    const lpEnd = poolEnd;
    kind[p] = ELEMENT;
    listStart[p] = lpStart;
    listLen[p] = lpEnd - lpStart;
    elemLen[p] = 0;

    // --- |L_e \ L_p| for every element e touching L_p ---------------------------------------
    for (let t = lpStart; t < lpEnd; t++) {
      const v = pool[t]!;
      const vs = listStart[v]!;
      const vw = weight[v]!;
      for (let u = 0; u < elemLen[v]!; u++) {
        const e = pool[vs + u]!;
        if (kind[e] !== ELEMENT) continue;
        const we = setDiff[e]!;
        if (we >= wMark) setDiff[e] = we - vw;
        else setDiff[e] = degree[e]! + wMark - vw;
      }
    }

    // --- degree update, list pruning, mass elimination, hashing ------------------------------
    for (let t = lpStart; t < lpEnd; t++) {
      const v = pool[t]!;
      const s = listStart[v]!;
      const ne = elemLen[v]!;
      const nl = listLen[v]!;
      let deg = 0;
      let w = s;
      let hash = 0;
      for (let u = 0; u < ne; u++) {
        const e = pool[s + u]!;
        if (kind[e] !== ELEMENT) continue;
        const outside = setDiff[e]! - wMark;
        if (outside > 0) {
          deg += outside;
          pool[w++] = e;
          hash += e;
        } else {
          kind[e] = GONE; // aggressive absorption: L_e ⊆ L_p
        }
      }
      const keptE = w - s;
      for (let u = ne; u < nl; u++) {
        const j = pool[s + u]!;
        if (kind[j] !== VARIABLE || inLp[j] === step) continue;
        deg += weight[j]!;
        pool[w++] = j;
        hash += j;
      }
      const keptA = w - s - keptE;
      if (keptE + keptA + 1 > nl) throw new Error('approximateMinimumDegree: internal error (no room for the new element)');
      if (keptA > 0) pool[s + keptE + keptA] = pool[s + keptE]!;
      pool[s + keptE] = p;
      elemLen[v] = keptE + 1;
      listLen[v] = keptE + keptA + 1;
      if (keptE === 0 && keptA === 0) {
        // mass elimination: v's only neighbour is p
        kind[v] = GONE;
        joinedTo[v] = p;
        eliminated += weight[v]!;
        degMe -= weight[v]!;
        continue;
      }
      if (deg < degree[v]!) degree[v] = deg;
      hash = (hash + p) % n;
      hashOf[v] = hash;
      hashNext[v] = hashHead[hash]!;
      hashHead[hash] = v;
    }

    // --- supervariable detection among L_p ---------------------------------------------------
    for (let t = lpStart; t < lpEnd; t++) {
      const v0 = pool[t]!;
      if (kind[v0] !== VARIABLE) continue;
      const h = hashOf[v0]!;
      let i = hashHead[h]!;
      if (i < 0) continue;
      hashHead[h] = -1;
      // walk the chain: compare each i with all later j of the chain
      while (i >= 0) {
        if (kind[i] === VARIABLE) {
          const is = listStart[i]!;
          const il = listLen[i]!;
          const ie = elemLen[i]!;
          cmpStamp++;
          for (let u = 0; u < il; u++) cmpMark[pool[is + u]!] = cmpStamp;
          let before = i;
          let j = hashNext[i]!;
          while (j >= 0) {
            const jn = hashNext[j]!;
            let same = kind[j] === VARIABLE && listLen[j] === il && elemLen[j] === ie;
            if (same) {
              const js = listStart[j]!;
              for (let u = 0; u < il; u++) {
                if (cmpMark[pool[js + u]!] !== cmpStamp) {
                  same = false;
                  break;
                }
              }
            }
            if (same) {
              weight[i] = weight[i]! + weight[j]!;
              weight[j] = 0;
              kind[j] = GONE;
              joinedTo[j] = i;
              hashNext[before] = jn;
            } else {
              before = j;
            }
            j = jn;
          }
        }
        i = hashNext[i]!;
      }
    }

    // --- final degrees; keep only principal variables in L_p ---------------------------------
    let w = lpStart;
    for (let t = lpStart; t < lpEnd; t++) {
      const v = pool[t]!;
      if (kind[v] !== VARIABLE) continue;
      pool[w++] = v;
      const vw = weight[v]!;
      let d = degree[v]! + degMe - vw;
      const bound = live - eliminated - vw;
      if (bound < d) d = bound;
      if (d < 0) d = 0;
      degree[v] = d;
      insert(v, d);
    }
    listLen[p] = w - lpStart;
    poolEnd = w;
    weight[p] = pWeight;
    degree[p] = degMe;
    if (listLen[p] === 0) kind[p] = GONE; // an element with no variables plays no further part
    wMark += n + 1;
  }

  // --- expand: each pivot followed by the variables that went with it ----------------------
  // root pivot of every absorbed variable, with path compression
  const root = new Int32Array(n).fill(-1);
  for (let i = 0; i < n; i++) {
    if (kind[i] === DENSE) continue;
    let r = i;
    while (elimStep[r]! < 0) r = joinedTo[r]!;
    let c = i;
    while (elimStep[c]! < 0) {
      const nx = joinedTo[c]!;
      joinedTo[c] = r;
      c = nx;
    }
    root[i] = r;
  }
  const count = new Int32Array(nPivots + 1);
  for (let i = 0; i < n; i++) if (root[i]! >= 0) count[elimStep[root[i]!]! + 1]++;
  for (let k = 0; k < nPivots; k++) count[k + 1] += count[k]!;
  // pivot first within its group
  for (let k = 0; k < nPivots; k++) order[count[k]!++] = pivots[k]!;
  for (let i = 0; i < n; i++) {
    const r = root[i]!;
    if (r >= 0 && r !== i) order[count[elimStep[r]!]!++] = i;
  }
  let pos = live;
  for (let i = 0; i < n; i++) if (kind[i] === DENSE) order[pos++] = i;
  return order;
}
