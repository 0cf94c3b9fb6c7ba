/**
 * The closing checks, once everything is read: `--set` overrides that name no parameter, the
 * connections (a port on a node no element touches, a node with a single connection), parameters
 * and blocks never used, and node groups with no path to ground (a group with a port gets a
 * reference of its own; one without is an error).
 *
 * @module
 */
import { didYouMean } from '../../diagnostics/suggest.js';
import { joinedNodes } from '../../elements/registry.js';
import { floatingGroups } from '../islands.js';
import type { ElabState } from '../state.js';

export function checksPass(s: ElabState): void {
  unknownOverrides(s);
  connections(s);
  unusedNames(s);
  floating(s);
}

/** Overrides that name no parameter. */
function unknownOverrides(s: ElabState): void {
  for (const o of s.overrides.values()) {
    if (!s.globals.entries.has(o.name)) {
      s.bag.error('unknown-parameter', `\`--set ${o.name}\`: the netlist has no parameter \`${o.name}\``, o.span, didYouMean(o.name, s.globals.entries.keys()));
    }
  }
}

/** Warnings about the connections (not when errors may have dropped some elements). */
function connections(s: ElabState): void {
  const { bag, nodeNames } = s;
  if (!bag.hasErrors) s.nodeUses.forEach((u, i) => {
    const name = nodeNames[i]!;
    if (u.elementUses === 0) {
      bag.error('port-on-bare-node', `${u.by} is on node \`${name}\`, which no element touches`, u.first, didYouMean(name, nodeNames.filter((n) => n !== name)) ?? 'connect an element to the node, or check its spelling');
    } else if (u.count === 1) {
      bag.warning('dangling-node', `node \`${name}\` has a single connection (${u.by})`, u.first, didYouMean(name, nodeNames.filter((n) => n !== name)) ?? 'check the spelling of the node name');
    }
  });
}

/** Parameters and blocks never used. */
function unusedNames(s: ElabState): void {
  const { bag, blocks } = s;
  for (const [key, d] of s.definitions) {
    if (!s.usedKeys.has(key) && !s.usedEarly.has(key) && !d.failed) {
      bag.warning('unused-parameter', `${d.what} \`${d.name}\` is never used`, d.span);
    }
  }
  // blocks used inside used blocks count as used, also where expansion stopped (a cycle, a limit)
  const reach = [...blocks.values()].filter((b) => b.used);
  while (reach.length > 0) {
    for (const st of reach.pop()!.body) {
      const c = blocks.get(st.keyword);
      if (c && !c.used) {
        c.used = true;
        reach.push(c);
      }
    }
  }
  for (const b of blocks.values()) {
    if (!b.used) bag.warning('unused-block', `block \`${b.name}\` is never used`, b.header.label?.span ?? b.header.keywordSpan);
  }
}

/**
 * Node groups with no path to ground: a group that carries a port is a balanced network and is
 * given a reference of its own (its first node), which changes nothing since no current can
 * flow to ground from it; a group with neither ground nor a port is a mistake.
 */
function floating(s: ElabState): void {
  const { bag, nodeNames, portList } = s;
  const portNodes = new Set(portList.flatMap((p) => [p.plus, p.minus]));
  const links = [...s.elements.flatMap((e) => joinedNodes(e)), ...portList.map((p) => [p.plus, p.minus])];
  for (const group of bag.hasErrors ? [] : floatingGroups(nodeNames.length, links)) {
    if (group.some((n) => portNodes.has(n))) {
      s.localReferences.push(group[0]!);
      continue;
    }
    const names = group.map((n) => `\`${nodeNames[n]}\``);
    const shown = names.length > 6 ? [...names.slice(0, 6), `and ${names.length - 6} more`] : names;
    bag.error('floating-nodes', `${group.length === 1 ? 'node' : 'nodes'} ${shown.join(', ')} ${group.length === 1 ? 'is' : 'are'} connected neither to ground nor to any port`, s.nodeUses[group[0]!]!.first, 'connect the group to `ground` or put a port across it');
  }
}
