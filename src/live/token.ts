/**
 * The access token of a live page and the checks every request passes before anything else:
 * the token in the path, the Host header (no DNS rebinding: a page of another name that resolves
 * to 127.0.0.1 sends its own name), and the Origin header (no cross-site requests).
 *
 * @module
 */
import { randomBytes, timingSafeEqual } from 'node:crypto';

/** A fresh random token: 24 bytes, base64url (32 characters). */
export function makeToken(): string {
  return randomBytes(24).toString('base64url');
}

/** Whether `given` is the token, compared in constant time. */
export function tokenMatches(given: string, token: string): boolean {
  const a = Buffer.from(given, 'utf8');
  const b = Buffer.from(token, 'utf8');
  return a.length === b.length && timingSafeEqual(a, b);
}

/** A refused request: the status and a plain message. */
export interface Refusal {
  status: number;
  message: string;
}

/**
 * Checks the Host, Origin and Sec-Fetch-Site headers of a request to the server on `port`:
 * Host must be `127.0.0.1:PORT` or `localhost:PORT`; an Origin, when sent, must be
 * `http://127.0.0.1:PORT` or `http://localhost:PORT`; a browser's Sec-Fetch-Site, when sent,
 * must say the request comes from the page itself (or from the address bar). Undefined: allowed.
 */
export function checkHeaders(headers: Record<string, string | string[] | undefined>, port: number): Refusal | undefined {
  const hosts = [`127.0.0.1:${port}`, `localhost:${port}`];
  const host = headers.host;
  if (typeof host !== 'string' || !hosts.includes(host.toLowerCase())) {
    return { status: 403, message: `refused: the Host header must be 127.0.0.1:${port} or localhost:${port}` };
  }
  const origin = headers.origin;
  if (origin !== undefined && (typeof origin !== 'string' || !hosts.some((h) => origin.toLowerCase() === `http://${h}`))) {
    return { status: 403, message: 'refused: a request from another site' };
  }
  const site = headers['sec-fetch-site'];
  if (site !== undefined && site !== 'same-origin' && site !== 'none') {
    return { status: 403, message: 'refused: a request from another site' };
  }
  return undefined;
}
