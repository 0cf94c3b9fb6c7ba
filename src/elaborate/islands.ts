import { GROUND } from '../elements/types.js';

/** Union–find over node indices, with ground as one extra member. */
export class NodeSets {
  private readonly parent: Int32Array;
  constructor(readonly nodeCount: number) {
    this.parent = new Int32Array(nodeCount + 1);
    for (let i = 0; i <= nodeCount; i++) this.parent[i] = i;
  }
  private id(node: number): number {
    return node === GROUND ? this.nodeCount : node;
  }
  find(node: number): number {
    let x = this.id(node);
    while (this.parent[x] !== x) {
      this.parent[x] = this.parent[this.parent[x]!]!;
      x = this.parent[x]!;
    }
    return x;
  }
  join(a: number, b: number): void {
    const ra = this.find(a);
    const rb = this.find(b);
    if (ra === rb) return;
    // ground stays a root, so that `grounded` is one comparison
    if (ra === this.nodeCount) this.parent[rb] = ra;
    else this.parent[ra] = rb;
  }
  grounded(node: number): boolean {
    return this.find(node) === this.nodeCount;
  }
}

/**
 * Groups of nodes with no connection to ground: for each, its nodes (ascending). `links` lists
 * the node pairs that elements and ports connect.
 */
export function floatingGroups(nodeCount: number, links: Iterable<readonly number[]>): number[][] {
  const sets = new NodeSets(nodeCount);
  for (const ns of links) for (let k = 1; k < ns.length; k++) sets.join(ns[0]!, ns[k]!);
  const groups = new Map<number, number[]>();
  for (let i = 0; i < nodeCount; i++) {
    if (sets.grounded(i)) continue;
    const r = sets.find(i);
    let g = groups.get(r);
    if (!g) groups.set(r, (g = []));
    g.push(i);
  }
  return [...groups.values()];
}
