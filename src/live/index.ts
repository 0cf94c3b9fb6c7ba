/**
 * `scatterbox live`: a local page that re-solves as the netlist changes and tunes its design
 * variables with sliders. {@link startLive} starts the server (src/live/server.ts).
 *
 * @module
 */
export { startLive, type LiveOptions, type LiveServer } from './server.js';
export { LiveSession, LiveRequestError, type LiveResult } from './session.js';
export { sliderOf } from './sliders.js';
export { checkHeaders, makeToken, tokenMatches } from './token.js';
