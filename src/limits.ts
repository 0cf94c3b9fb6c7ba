/**
 * Documented resource limits. Every reader and stage that could otherwise run out of memory, stack
 * or time on hostile or mistaken input stops at one of these with a located error that states the
 * limit. The values are generous for real designs and are listed in grammar/README.md ("Limits")
 * and in the README; change them here only, and the documentation with them.
 */

/** Ports of a netlist or a network-data file (a dense P×P complex matrix per frequency). */
export const MAX_PORTS = 1000;

/** Frequency points of a sweep, all segments together (`per_decade` included). */
export const MAX_SWEEP_POINTS = 10_000_000;

/** Complex values of one network result or data file: points × ports². */
export const MAX_NETWORK_VALUES = 100_000_000;

/** Elements after blocks are flattened (guards against exponential expansion of nested blocks). */
export const MAX_EXPANDED_ELEMENTS = 5_000_000;

/** Depth of nested block instances (a block whose body uses a block …). */
export const MAX_BLOCK_DEPTH = 200;

/** Depth of nested `include` statements. */
export const MAX_INCLUDE_DEPTH = 100;

/** Nesting depth of an expression: parentheses, function calls, unary signs. */
export const MAX_EXPRESSION_DEPTH = 200;

/** Size of any file read: netlist, included file or data file (only regular files are read). */
export const MAX_FILE_BYTES = 256 * 1024 * 1024;

/** Smallest and largest reference resistance, Ω, of a port or a network-data file: the power-wave normalisation takes √R and 1/√R, and mixed-mode references (2·R, R/2) stay finite. */
export const MIN_REFERENCE_OHMS = 1e-6;
export const MAX_REFERENCE_OHMS = 1e9;

/** Members of a family (`vary`): values of one `--over`, and all combinations of two. */
export const MAX_FAMILY_MEMBERS = 1000;

/** Samples of one yield run (`--samples`): their margins and draws are kept, a few numbers each. */
export const MAX_YIELD_SAMPLES = 10_000_000;

/** |S| values kept for the percentile envelopes of a yield run (envelope samples × points × ports²): 400 MB of numbers. */
export const MAX_ENVELOPE_VALUES = 50_000_000;

/** Body of one request to a live page's server (`scatterbox live`): a few numbers as JSON. */
export const MAX_LIVE_REQUEST_BYTES = 64 * 1024;
