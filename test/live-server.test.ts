// The live server at the HTTP level: every request needs the token; a foreign Host (DNS
// rebinding) or a foreign Origin (a cross-site request) is refused; only the routes of the page
// answer (no file is ever served); malformed requests get an error and the server goes on
// (fast-check: random methods, paths, queries, headers and bodies, sent as raw bytes); a deleted
// netlist is announced; write-back writes nothing outside the netlist's own files; the command
// stops cleanly on SIGINT.
//
// Status codes are those of RFC 9110 (403 Forbidden, 404 Not Found, 405 Method Not Allowed, 413
// Content Too Large, 415 Unsupported Media Type, 400 Bad Request); the event stream is the
// WHATWG HTML "server-sent events" format (`event:` and `data:` lines, a blank line after each).
import { spawn } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync, unlinkSync, writeFileSync } from 'node:fs';
import { request, type IncomingHttpHeaders } from 'node:http';
import { connect } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startLive, type LiveServer } from '../src/live/server.js';
import { checkHeaders, tokenMatches } from '../src/live/token.js';

const root = join(import.meta.dirname, '..');
const DEMO = readFileSync(join(root, 'circuits', 'match-50-75-915.sbx'), 'utf8');

interface Answer {
  status: number;
  headers: IncomingHttpHeaders;
  body: string;
}

/** One request with the headers exactly as given (Host included). */
function ask(port: number, path: string, o: { method?: string; headers?: Record<string, string>; body?: string } = {}): Promise<Answer> {
  return new Promise((ok, ko) => {
    const req = request({ host: '127.0.0.1', port, path, method: o.method ?? 'GET', headers: { host: `127.0.0.1:${port}`, ...o.headers }, setHost: false }, (res) => {
      const chunks: Buffer[] = [];
      res.on('data', (c: Buffer) => chunks.push(c));
      res.on('end', () => ok({ status: res.statusCode!, headers: res.headers, body: Buffer.concat(chunks).toString('utf8') }));
    });
    req.on('error', ko);
    req.end(o.body);
  });
}

/** Raw bytes to the server; resolves with what came back (until the server closes or 2 s pass). */
function raw(port: number, bytes: Buffer | string): Promise<string> {
  return new Promise((ok) => {
    const chunks: Buffer[] = [];
    const s = connect(port, '127.0.0.1', () => s.end(bytes));
    const done = () => ok(Buffer.concat(chunks).toString('latin1'));
    s.on('data', (c) => chunks.push(c));
    s.on('close', done);
    s.on('error', done);
    s.setTimeout(2000, () => s.destroy());
  });
}

/** Events of the stream until `until` says enough (or 10 s pass). */
function listen(port: number, path: string, until: (events: { event: string; data: string }[]) => boolean): Promise<{ event: string; data: string }[]> {
  return new Promise((ok, ko) => {
    const events: { event: string; data: string }[] = [];
    let buf = '';
    const req = request({ host: '127.0.0.1', port, path, headers: { host: `127.0.0.1:${port}` } }, (res) => {
      res.on('data', (c: Buffer) => {
        buf += c.toString('utf8');
        let at;
        while ((at = buf.indexOf('\n\n')) >= 0) {
          const block = buf.slice(0, at);
          buf = buf.slice(at + 2);
          const event = /^event: (.*)$/m.exec(block)?.[1];
          const data = /^data: (.*)$/m.exec(block)?.[1];
          if (event && data !== undefined) events.push({ event, data });
        }
        if (until(events)) {
          req.destroy();
          ok(events);
        }
      });
    });
    req.on('error', (e) => (events.length && until(events) ? ok(events) : ko(e)));
    setTimeout(() => {
      req.destroy();
      ok(events);
    }, 10_000);
    req.end();
  });
}

describe('live server', () => {
  let dir: string;
  let file: string;
  let live: LiveServer;
  let base: string;

  beforeAll(async () => {
    dir = mkdtempSync(join(tmpdir(), 'sbx-live-server-'));
    file = join(dir, 'match.sbx');
    writeFileSync(file, DEMO);
    writeFileSync(join(dir, 'secret.txt'), 'not to be served');
    live = await startLive({ netlist: file });
    base = `/${live.token}/`;
  });
  afterAll(async () => {
    await live?.close();
    if (dir) rmSync(dir, { recursive: true, force: true });
  });

  it('listens on 127.0.0.1 only and prints an address with a 32-character token', () => {
    expect(live.url).toBe(`http://127.0.0.1:${live.port}/${live.token}/`);
    expect(live.token).toMatch(/^[A-Za-z0-9_-]{32}$/);
  });

  it('serves the page with the token, with headers that keep it out of frames and caches', async () => {
    const a = await ask(live.port, base);
    expect(a.status).toBe(200);
    expect(a.headers['content-type']).toBe('text/html; charset=utf-8');
    expect(a.headers['x-frame-options']).toBe('DENY');
    expect(a.headers['cache-control']).toBe('no-store');
    expect(a.headers['referrer-policy']).toBe('no-referrer');
    expect(a.body).toContain('data-testid="live"');
    expect(a.body).toContain("connect-src 'self'");
    // localhost:PORT is the same server
    expect((await ask(live.port, base, { headers: { host: `localhost:${live.port}` } })).status).toBe(200);
  });

  it('refuses requests without the token, or with another one', async () => {
    for (const path of ['/', '/events', '/solve', `/${live.token.slice(1)}/`, `/${live.token}x/`, `/x${live.token}/`, `/?token=${live.token}`, `//${live.token}/`]) {
      const a = await ask(live.port, path);
      expect(a.status, path).toBe(403);
      expect(JSON.parse(a.body).error).toMatch(/access token/);
    }
    const post = await ask(live.port, '/solve', { method: 'POST', headers: { 'content-type': 'application/json' }, body: '{"values":[5e-9,1e-12]}' });
    expect(post.status).toBe(403);
  });

  it('refuses a foreign Host (DNS rebinding) and a foreign Origin (cross-site), even with the token', async () => {
    for (const host of ['evil.example', `evil.example:${live.port}`, '127.0.0.1', `127.0.0.1:${live.port + 1}`, `[::1]:${live.port}`, `0.0.0.0:${live.port}`, '']) {
      const a = await ask(live.port, base, { headers: { host } });
      expect(a.status, host).toBe(403);
      expect(a.body).toMatch(/Host/);
    }
    for (const origin of ['http://evil.example', `http://127.0.0.1:${live.port + 1}`, `https://127.0.0.1:${live.port}`, 'null', `http://localhost.evil.example:${live.port}`]) {
      const a = await ask(live.port, `${base}solve`, { method: 'POST', headers: { origin, 'content-type': 'application/json' }, body: '{"values":[5e-9,1e-12]}' });
      expect(a.status, origin).toBe(403);
      expect(a.body).toMatch(/another site/);
    }
    const cross = await ask(live.port, `${base}solve`, { method: 'POST', headers: { 'sec-fetch-site': 'cross-site', 'content-type': 'application/json' }, body: '{"values":[5e-9,1e-12]}' });
    expect(cross.status).toBe(403);
    // the page's own origin is fine
    const own = await ask(live.port, `${base}solve`, { method: 'POST', headers: { origin: `http://127.0.0.1:${live.port}`, 'sec-fetch-site': 'same-origin', 'content-type': 'application/json' }, body: '{"values":[5e-9,1e-12]}' });
    expect(own.status).toBe(200);
  });

  it('serves no file: paths beside the routes are 404, whatever they name', async () => {
    for (const p of ['secret.txt', 'match.sbx', '../secret.txt', '%2e%2e/secret.txt', '..%2fsecret.txt', `${file}`, 'events/../secret.txt']) {
      const a = await ask(live.port, `${base}${p}`);
      expect(a.status, p).toBe(404);
      expect(a.body).not.toContain('not to be served');
      expect(a.body).not.toContain('let lser');
    }
  });

  it('answers malformed requests with an error and keeps running', async () => {
    const post = (body: string, type = 'application/json') => ask(live.port, `${base}solve`, { method: 'POST', headers: { 'content-type': type }, body });
    expect((await post('{')).status).toBe(400);
    expect((await post('[1,2]')).status).toBe(400);
    expect((await post('{"values":[1,2,3]}')).status).toBe(400);
    expect((await post('{"values":["1 nH",2]}')).status).toBe(400);
    expect((await post('{"values":[1e309,1e-12]}')).status).toBe(400);
    expect((await post('{"values":[5e-9,1e-12]}', 'text/plain')).status).toBe(415);
    expect((await post(`{"values":[${'1,'.repeat(40_000)}1]}`)).status).toBe(413);
    expect((await ask(live.port, `${base}solve`)).status).toBe(405);
    expect((await ask(live.port, base, { method: 'POST', headers: { 'content-type': 'application/json' }, body: '{}' })).status).toBe(405);
    expect(await raw(live.port, 'GARBAGE\r\n\r\n')).toMatch(/^HTTP\/1\.1 400/);
    expect(await raw(live.port, Buffer.from([0, 1, 2, 255, 13, 10, 13, 10]))).toMatch(/^HTTP\/1\.1 400/);
    // a value outside its range is held at its bound (the slider cannot go further)
    const held = await post('{"values":[1,1]}');
    expect(held.status).toBe(200);
    expect(JSON.parse(held.body).values).toEqual(live.session.variables.map((v) => v.upper));
    expect((await ask(live.port, base)).status).toBe(200);
  });

  it('fuzz: random methods, paths, queries, headers and bodies never crash the server', async () => {
    const token = live.token;
    const segment = fc.oneof(fc.constantFrom(token, 'solve', 'reset', 'write-back', 'events', '..', '.', '%2e%2e', '', '%00', 'a'.repeat(300)), fc.string({ maxLength: 12 }));
    const path = fc.array(segment, { maxLength: 5 }).map((s) => `/${s.join('/')}`);
    const query = fc.option(fc.string({ maxLength: 30 }).map((q) => `?${q}`), { nil: '' });
    const method = fc.constantFrom('GET', 'POST', 'PUT', 'DELETE', 'HEAD', 'OPTIONS', 'PATCH', 'BREW', 'G ET', '');
    const hostHeader = fc.constantFrom(`127.0.0.1:${live.port}`, `localhost:${live.port}`, 'evil.example', '', `127.0.0.1:${live.port}\r\nHost: evil.example`);
    const header = fc.tuple(fc.constantFrom('Origin', 'Content-Type', 'Content-Length', 'Sec-Fetch-Site', 'Transfer-Encoding', 'X-Y', 'Host'), fc.oneof(fc.string({ maxLength: 40 }), fc.constantFrom('application/json', 'chunked', '-1', '99999999999', `http://127.0.0.1:${live.port}`)));
    const body = fc.oneof(
      fc.string({ maxLength: 200 }),
      fc.json({ maxDepth: 3 }),
      fc.array(fc.double(), { maxLength: 4 }).map((v) => JSON.stringify({ values: v })),
      fc.uint8Array({ maxLength: 200 }).map((b) => Buffer.from(b).toString('latin1')),
    );
    await fc.assert(
      fc.asyncProperty(method, path, query, hostHeader, fc.array(header, { maxLength: 4 }), body, async (m, p, q, h, hs, b) => {
        const lines = [`${m} ${p}${q} HTTP/1.1`, `Host: ${h}`, ...hs.map(([k, v]) => `${k}: ${v.replace(/[\r\n]/g, '')}`), `Content-Length: ${Buffer.byteLength(b, 'latin1')}`, 'Connection: close', '', ''];
        const reply = await raw(live.port, Buffer.concat([Buffer.from(lines.join('\r\n'), 'latin1'), Buffer.from(b, 'latin1')]));
        // an answer with a status line, or a connection closed without one (a bad request line)
        if (reply.length > 0) expect(reply).toMatch(/^HTTP\/1\.1 \d{3} /);
        const status = Number(reply.slice(9, 12));
        // never a server error
        if (reply.length > 0) expect(status).toBeLessThan(500);
        // the server still answers
        expect((await ask(live.port, base, { method: 'HEAD' })).status).toBe(200);
      }),
      { numRuns: 150, seed: 17 },
    );
    // and the file was never written by any of these (write-back needs a whole valid request)
    expect(readFileSync(file, 'utf8')).toBe(DEMO);
  }, 120_000);

  it('reset and solve answer with results; write-back is refused when the file changed on disk since', async () => {
    const r = await ask(live.port, `${base}reset`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: '{}' });
    expect(r.status).toBe(200);
    const before = JSON.parse(r.body) as { values: number[] };
    expect(before.values).toEqual(live.session.variables.map((v) => v.value));
    // changed on disk without the watcher having reloaded yet (no event loop turn in between)
    writeFileSync(file, `${DEMO}# edited\n`);
    const wb = await ask(live.port, `${base}write-back`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ values: [4.7e-9, 1e-12] }) });
    if (wb.status === 409) {
      expect(JSON.parse(wb.body).error).toMatch(/changed on disk/);
      expect(readFileSync(file, 'utf8')).toBe(`${DEMO}# edited\n`);
    } else {
      // the watcher was quicker: the write went into the new text, keeping the edit
      expect(wb.status).toBe(200);
      expect(readFileSync(file, 'utf8')).toMatch(/# edited\n$/);
    }
    writeFileSync(file, DEMO);
  });

  it('a netlist that is deleted is announced on the page\'s event stream, and followed when it is back', async () => {
    const got = listen(live.port, `${base}events`, (ev) => ev.some((e) => e.event === 'diagnostics' && /was deleted/.test(e.data)));
    await new Promise((r) => setTimeout(r, 200));
    unlinkSync(file);
    const events = await got;
    const gone = events.find((e) => e.event === 'diagnostics');
    expect(gone && JSON.parse(gone.data).text).toMatch(/match\.sbx was deleted/);
    const back = listen(live.port, `${base}events`, (ev) => ev.some((e) => e.event === 'result'));
    await new Promise((r) => setTimeout(r, 200));
    writeFileSync(file, DEMO);
    const again = await back;
    expect(again.some((e) => e.event === 'result')).toBe(true);
  });

  it('the header checks alone: Host and Origin of the server\'s own port only (common practice against DNS rebinding)', () => {
    expect(checkHeaders({ host: '127.0.0.1:8123' }, 8123)).toBeUndefined();
    expect(checkHeaders({ host: 'LOCALHOST:8123', origin: 'http://localhost:8123' }, 8123)).toBeUndefined();
    expect(checkHeaders({ host: '127.0.0.1:8124' }, 8123)?.status).toBe(403);
    expect(checkHeaders({ host: '127.0.0.1:8123', origin: 'http://127.0.0.1:8124' }, 8123)?.status).toBe(403);
    expect(checkHeaders({ host: '127.0.0.1:8123', 'sec-fetch-site': 'same-site' }, 8123)?.status).toBe(403);
    expect(checkHeaders({ host: ['127.0.0.1:8123'] as unknown as string }, 8123)?.status).toBe(403);
    expect(tokenMatches('abc', 'abc')).toBe(true);
    expect(tokenMatches('abd', 'abc')).toBe(false);
    expect(tokenMatches('', 'abc')).toBe(false);
  });
});

describe('a netlist with errors at the start', () => {
  it('shows its located diagnostics, then the result once it is fixed', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'sbx-live-bad-'));
    const file = join(dir, 'bad.sbx');
    const bad = DEMO.replace('port 2 plus=feed  ref=rhi', 'port 2 plus=feed  ref=rhi )');
    writeFileSync(file, bad);
    const live = await startLive({ netlist: file });
    try {
      const a = await ask(live.port, `/${live.token}/`);
      expect(a.status).toBe(200);
      const line = bad.split('\n').findIndex((l) => l.includes('ref=rhi )')) + 1;
      expect(a.body).toContain(`bad.sbx:${line}:`);
      const solve = await ask(live.port, `/${live.token}/solve`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: '{"values":[5e-9,1e-12]}' });
      expect(solve.status).toBe(400);
      const got = listen(live.port, `/${live.token}/events`, (ev) => ev.some((e) => e.event === 'result'));
      await new Promise((r) => setTimeout(r, 200));
      writeFileSync(file, DEMO);
      expect((await got).some((e) => e.event === 'result')).toBe(true);
      expect((await ask(live.port, `/${live.token}/`)).body).toContain('data-testid="slider"');
    } finally {
      await live.close();
      rmSync(dir, { recursive: true, force: true });
    }
  });
});

describe('scatterbox live (the command, from dist/)', () => {
  it('prints the address, refuses a taken port, and stops cleanly on SIGINT', async () => {
    const cli = join(root, 'bin', 'scatterbox.js');
    const child = spawn(process.execPath, [cli, 'live', join(root, 'circuits', 'match-50-75-915.sbx')], { stdio: ['ignore', 'pipe', 'pipe'] });
    let out = '';
    let err = '';
    child.stdout.on('data', (c: Buffer) => (out += c.toString()));
    child.stderr.on('data', (c: Buffer) => (err += c.toString()));
    const exited = new Promise<number | null>((r) => child.on('exit', (code) => r(code)));
    try {
      for (let i = 0; i < 200 && !/\n/.test(out); i++) await new Promise((r) => setTimeout(r, 100));
      const m = /^http:\/\/127\.0\.0\.1:(\d+)\/([A-Za-z0-9_-]{32})\/\n$/.exec(out);
      expect(m, out + err).not.toBeNull();
      const port = Number(m![1]);
      expect((await ask(port, `/${m![2]}/`)).status).toBe(200);
      // the same port again: a plain error, exit code 1
      const second = spawn(process.execPath, [cli, 'live', join(root, 'circuits', 'match-50-75-915.sbx'), '--port', String(port)], { stdio: ['ignore', 'pipe', 'pipe'] });
      let err2 = '';
      second.stderr.on('data', (c: Buffer) => (err2 += c.toString()));
      const code2 = await new Promise<number | null>((r) => second.on('exit', (c) => r(c)));
      expect(code2).toBe(1);
      expect(err2).toMatch(/port \d+ is taken/);
      child.kill('SIGINT');
      expect(await exited).toBe(0);
      expect(err).toMatch(/stopped\n$/);
    } finally {
      if (child.exitCode === null) child.kill('SIGKILL');
    }
  }, 60_000);

  it('a missing netlist is a plain error', async () => {
    const child = spawn(process.execPath, [join(root, 'bin', 'scatterbox.js'), 'live', join(root, 'no-such.sbx')], { stdio: ['ignore', 'pipe', 'pipe'] });
    let err = '';
    child.stderr.on('data', (c: Buffer) => (err += c.toString()));
    const code = await new Promise<number | null>((r) => child.on('exit', (c) => r(c)));
    expect(code).toBe(1);
    expect(err).toMatch(/no-such\.sbx: no such file/);
    expect(existsSync(join(root, 'no-such.sbx'))).toBe(false);
  }, 30_000);
});

describe('a netlist with an included file', () => {
  it('follows a change of the included file, and writes a variable defined there into that file only', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'sbx-live-include-'));
    const main = join(dir, 'main.sbx');
    const part = join(dir, 'part.sbx');
    // an RC low-pass: series R, shunt C; the capacitor's value is a variable of the included file
    const partText = '# the shunt part\nlet cs = 2 pF vary 1 pF to 10 pF   # tuned\ncapacitor c1 a=out b=ground value=cs\n';
    const mainText = 'title "include test"\ninclude "part.sbx"\nresistor r1 a=in b=out value=50 ohm\nport 1 plus=in\nport 2 plus=out\nsweep linear start=10 MHz stop=1 GHz points=21\n';
    writeFileSync(part, partText);
    writeFileSync(main, mainText);
    const live = await startLive({ netlist: main });
    try {
      expect([...live.session.files].sort()).toEqual([main, part].sort());
      const base = `/${live.token}/`;
      const got = listen(live.port, `${base}events`, (ev) => ev.some((e) => e.event === 'result'));
      await new Promise((r) => setTimeout(r, 200));
      writeFileSync(part, partText.replace('value=cs', 'value=cs q=100 at 100 MHz'));
      const ev = (await got).find((e) => e.event === 'result')!;
      expect(JSON.parse(ev.data).why).toMatch(/part\.sbx/);
      const wb = await ask(live.port, `${base}write-back`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ values: [4.7e-12] }) });
      expect(wb.status).toBe(200);
      expect(JSON.parse(wb.body).files).toEqual([part]);
      expect(readFileSync(main, 'utf8')).toBe(mainText);
      expect(readFileSync(part, 'utf8')).toBe(partText.replace('value=cs', 'value=cs q=100 at 100 MHz').replace('let cs = 2 pF vary', 'let cs = 4.7 pF vary'));
    } finally {
      await live.close();
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
