/**
 * The server of `scatterbox live`: HTTP on the loopback address only, every request checked
 * (the token in the path, Host, Origin; src/live/token.ts) before it is read, and these routes
 * under `/TOKEN/` and nothing else:
 *
 *   GET  /TOKEN/             the page (the report with its live section)
 *   GET  /TOKEN/events       server-sent events: `result` (a new result), `diagnostics` (the netlist
 *                            does not load, or is gone: the page keeps its last result)
 *   POST /TOKEN/solve        {"values": [...]} → the result at those values (SI units)
 *   POST /TOKEN/reset        {} → the result at the netlist's own values
 *   POST /TOKEN/write-back   {"values": [...]} → writes them into the netlist's own files
 *
 * No file is served; only the netlist's own files are written (by write-back). A malformed
 * request gets a 4xx answer with a plain message and the server goes on. The netlist and its
 * included and data files are watched (chokidar; an editor that saves by writing a new file and
 * renaming it over the old one is seen as a change).
 *
 * @module
 */
import { createServer, type IncomingMessage, type Server, type ServerResponse } from 'node:http';
import type { AddressInfo } from 'node:net';
import { existsSync } from 'node:fs';
import { resolve } from 'node:path';
import { watch, type FSWatcher } from 'chokidar';
import { WriteBackError } from '../design/write-back.js';
import { VariableError } from '../design/model.js';
import { InputError } from '../diagnostics/diagnostic.js';
import { MAX_LIVE_REQUEST_BYTES } from '../limits.js';
import { LiveRequestError, LiveSession } from './session.js';
import { checkHeaders, makeToken, tokenMatches } from './token.js';

export interface LiveOptions {
  /** The netlist file. */
  netlist: string;
  /** The port (default 0: a free one). */
  port?: number;
  /** The token (default: a fresh random one). */
  token?: string;
  /** Messages for the terminal (one line each, no line end). */
  log?: (line: string) => void;
  /** Watch the netlist's files (default true). */
  watch?: boolean;
  /** Milliseconds to wait after a change for more changes before loading (default 40). */
  settle?: number;
}

export interface LiveServer {
  /** `http://127.0.0.1:PORT/TOKEN/` */
  url: string;
  port: number;
  token: string;
  session: LiveSession;
  /** Stops watching, ends the event streams and closes the server. */
  close(): Promise<void>;
  /** Loads the netlist again now and tells the pages (what the watcher does on a change). */
  reload(why?: string): void;
}

const SECURITY_HEADERS: Record<string, string> = {
  'cache-control': 'no-store',
  'x-content-type-options': 'nosniff',
  'referrer-policy': 'no-referrer',
  'x-frame-options': 'DENY',
  'cross-origin-resource-policy': 'same-origin',
  'cross-origin-opener-policy': 'same-origin',
  'content-security-policy': "frame-ancestors 'none'",
};

/** Starts a live server on 127.0.0.1; resolves once it listens (rejects if the port is taken). */
export async function startLive(o: LiveOptions): Promise<LiveServer> {
  const log = o.log ?? (() => {});
  const token = o.token ?? makeToken();
  const session = new LiveSession(o.netlist);
  if (!session.load()) log(session.diagnostics ?? '');
  const streams = new Set<ServerResponse>();
  let port = 0;

  const send = (event: string, body: unknown) => {
    const text = `event: ${event}\ndata: ${JSON.stringify(body)}\n\n`;
    for (const s of streams) s.write(text);
  };
  const reload = (why = 'a change of the netlist') => {
    const had = session.ready;
    if (session.load()) {
      send('result', session.result(why));
      log(`${why}: solved again`);
    } else {
      send('diagnostics', { text: session.diagnostics, status: had ? `${o.netlist} has errors: the last good result stays` : `${o.netlist} has errors` });
      log(`${why}: ${o.netlist} has errors (shown on the page)\n${session.diagnostics ?? ''}`);
    }
    void watchNew();
  };

  const server: Server = createServer((req, res) => {
    try {
      handle(req, res);
    } catch (e) {
      fail(res, 500, `the server could not answer: ${e instanceof Error ? e.message : String(e)}`);
    }
  });
  server.on('clientError', (_err, socket) => {
    if (socket.writable) socket.end('HTTP/1.1 400 Bad Request\r\nContent-Type: text/plain; charset=utf-8\r\nConnection: close\r\n\r\nmalformed request\n');
    else socket.destroy();
  });
  server.headersTimeout = 10_000;
  server.requestTimeout = 30_000;

  function handle(req: IncomingMessage, res: ServerResponse): void {
    const refused = checkHeaders(req.headers, port);
    if (refused) return fail(res, refused.status, refused.message, req);
    const url = req.url ?? '';
    if (!url.startsWith('/')) return fail(res, 400, 'malformed request path', req);
    const path = url.split('?')[0]!.split('#')[0]!;
    const parts = path.split('/');
    // ['', TOKEN, route]
    if (!tokenMatches(parts[1] ?? '', token)) return fail(res, 403, 'refused: the address lacks its access token (use the address `scatterbox live` printed)', req);
    if (parts.length === 2) {
      res.writeHead(308, { ...SECURITY_HEADERS, location: `/${token}/` });
      res.end();
      req.resume();
      return;
    }
    const route = parts.slice(2).join('/');
    const method = req.method ?? '';
    if (route === '' || route === 'events') {
      if (method !== 'GET' && method !== 'HEAD') return fail(res, 405, `${method} is not allowed here (GET)`, req, { allow: 'GET, HEAD' });
      req.resume();
      if (route === '') return page(res, method === 'HEAD');
      return events(req, res);
    }
    if (route === 'solve' || route === 'reset' || route === 'write-back') {
      if (method !== 'POST') return fail(res, 405, `${method} is not allowed here (POST)`, req, { allow: 'POST' });
      const type = String(req.headers['content-type'] ?? '').split(';')[0]!.trim().toLowerCase();
      if (type !== 'application/json') return fail(res, 415, 'the body must be JSON (Content-Type: application/json)', req);
      return readBody(req, res, (body) => post(route, body, res));
    }
    return fail(res, 404, 'no such page', req);
  }

  function page(res: ServerResponse, head: boolean): void {
    const html = session.page(`/${token}/`);
    res.writeHead(200, { ...SECURITY_HEADERS, 'content-type': 'text/html; charset=utf-8', 'content-length': Buffer.byteLength(html) });
    res.end(head ? undefined : html);
  }

  function events(req: IncomingMessage, res: ServerResponse): void {
    res.writeHead(200, { ...SECURITY_HEADERS, 'content-type': 'text/event-stream; charset=utf-8', connection: 'keep-alive' });
    res.write(': scatterbox live\n\n');
    streams.add(res);
    res.on('close', () => streams.delete(res));
    res.on('error', () => streams.delete(res));
  }

  function post(route: string, text: string, res: ServerResponse): void {
    let body: unknown;
    try {
      body = JSON.parse(text);
    } catch {
      return fail(res, 400, 'the body is not valid JSON');
    }
    if (body === null || typeof body !== 'object' || Array.isArray(body)) return fail(res, 400, 'the body must be a JSON object');
    const values = (body as { values?: unknown }).values;
    try {
      if (route === 'solve') {
        session.setValues(values);
        return json(res, 200, session.result());
      }
      if (route === 'reset') {
        session.reset();
        return json(res, 200, session.result('reset'));
      }
      const files = session.writeBack(values);
      const message = files.length === 0 ? `${o.netlist} already holds these values; nothing written` : `wrote the values into ${files.join(', ')}`;
      log(message);
      return json(res, 200, { message, files });
    } catch (e) {
      if (e instanceof LiveRequestError || e instanceof VariableError) return fail(res, 400, e.message);
      if (e instanceof WriteBackError) return fail(res, 409, `not written: ${e.message}${e.help ? ` (${e.help})` : ''}`);
      if (e instanceof InputError) return fail(res, 422, e.message);
      throw e;
    }
  }

  // ---- watching ----------------------------------------------------------------------------
  let watcher: FSWatcher | undefined;
  const watched = new Set<string>();
  let timer: NodeJS.Timeout | undefined;
  let goneTimer: NodeJS.Timeout | undefined;
  const main = resolve(o.netlist);
  let gone = false;
  const changed = (file: string) => {
    if (timer) clearTimeout(timer);
    timer = setTimeout(() => {
      timer = undefined;
      if (!existsSync(main)) return;
      gone = false;
      reload(`a change of ${file === main ? o.netlist : file}`);
    }, o.settle ?? 40);
  };
  const removed = (file: string) => {
    if (resolve(file) !== main) return changed(file);
    if (goneTimer) clearTimeout(goneTimer);
    // an editor that saves by rename removes the file for a moment: wait before saying it is gone
    goneTimer = setTimeout(() => {
      goneTimer = undefined;
      if (existsSync(main) || gone) return;
      gone = true;
      const text = `${o.netlist} was deleted: the page keeps the last result and follows the netlist when it is back`;
      log(text);
      send('diagnostics', { text, status: `${o.netlist} was deleted` });
    }, 250);
  };
  async function watchNew(): Promise<void> {
    if (o.watch === false) return;
    const fresh = [...session.files].filter((f) => !watched.has(f));
    if (fresh.length === 0) return;
    for (const f of fresh) watched.add(f);
    if (!watcher) {
      watcher = watch(fresh, { ignoreInitial: true, atomic: 100, awaitWriteFinish: false, persistent: true });
      watcher.on('change', (f) => changed(resolve(f)));
      watcher.on('add', (f) => changed(resolve(f)));
      watcher.on('unlink', (f) => removed(resolve(f)));
      watcher.on('error', (e) => log(`watching: ${e instanceof Error ? e.message : String(e)}`));
      await new Promise<void>((r) => watcher!.once('ready', () => r()));
    } else watcher.add(fresh);
  }

  await new Promise<void>((ok, ko) => {
    server.once('error', ko);
    server.listen(o.port ?? 0, '127.0.0.1', () => {
      server.off('error', ko);
      ok();
    });
  });
  port = (server.address() as AddressInfo).port;
  server.on('error', (e) => log(`server: ${e.message}`));
  await watchNew();
  const keepAlive = setInterval(() => {
    for (const s of streams) s.write(': still here\n\n');
  }, 15_000);
  keepAlive.unref();

  let closing: Promise<void> | undefined;
  return {
    url: `http://127.0.0.1:${port}/${token}/`,
    port,
    token,
    session,
    reload,
    close() {
      closing ??= (async () => {
        clearInterval(keepAlive);
        if (timer) clearTimeout(timer);
        if (goneTimer) clearTimeout(goneTimer);
        await watcher?.close();
        for (const s of streams) s.end();
        streams.clear();
        await new Promise<void>((r) => {
          server.close(() => r());
          server.closeAllConnections();
        });
      })();
      return closing;
    },
  };
}

function json(res: ServerResponse, status: number, body: unknown): void {
  const text = JSON.stringify(body);
  res.writeHead(status, { ...SECURITY_HEADERS, 'content-type': 'application/json; charset=utf-8', 'content-length': Buffer.byteLength(text) });
  res.end(text);
}

/** A refusal or error: JSON `{ "error": message }`; the rest of the request is drained, not read. */
function fail(res: ServerResponse, status: number, message: string, req?: IncomingMessage, extra: Record<string, string> = {}): void {
  if (res.headersSent) {
    res.end();
    return;
  }
  const text = JSON.stringify({ error: message });
  res.writeHead(status, { ...SECURITY_HEADERS, ...extra, 'content-type': 'application/json; charset=utf-8', 'content-length': Buffer.byteLength(text), connection: 'close' });
  res.end(text);
  if (req) req.resume();
}

/** Reads a request body of at most MAX_LIVE_REQUEST_BYTES as UTF-8, then calls `done`. */
function readBody(req: IncomingMessage, res: ServerResponse, done: (text: string) => void): void {
  const declared = Number(req.headers['content-length'] ?? 0);
  if (declared > MAX_LIVE_REQUEST_BYTES) return fail(res, 413, `the body is larger than ${MAX_LIVE_REQUEST_BYTES} bytes (the limit of a live request)`, req);
  const chunks: Buffer[] = [];
  let size = 0;
  let over = false;
  req.on('data', (c: Buffer) => {
    if (over) return;
    size += c.length;
    if (size > MAX_LIVE_REQUEST_BYTES) {
      over = true;
      fail(res, 413, `the body is larger than ${MAX_LIVE_REQUEST_BYTES} bytes (the limit of a live request)`, req);
      return;
    }
    chunks.push(c);
  });
  req.on('end', () => {
    if (over) return;
    try {
      done(Buffer.concat(chunks).toString('utf8'));
    } catch (e) {
      fail(res, 500, `the server could not answer: ${e instanceof Error ? e.message : String(e)}`);
    }
  });
  req.on('error', () => {
    if (!res.headersSent) fail(res, 400, 'the request broke off');
  });
}
