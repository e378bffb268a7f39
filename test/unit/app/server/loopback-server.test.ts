import { mkdtemp, mkdir, rm, writeFile } from 'node:fs/promises';
import { request } from 'node:http';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startLoopbackServer, type LoopbackServer } from '../../../../app/server';

const samplesDir = resolve(import.meta.dirname, '../../../../samples');

interface Reply {
  status: number;
  headers: Record<string, string | string[] | undefined>;
  body: Buffer;
}

function call(port: number, method: string, path: string, headers: Record<string, string>, body?: Buffer | string): Promise<Reply> {
  return new Promise((resolvePromise, reject) => {
    const req = request({ host: '127.0.0.1', port, method, path, headers: { Host: `127.0.0.1:${port}`, ...headers } }, (res) => {
      const chunks: Buffer[] = [];
      res.on('data', (c: Buffer) => chunks.push(c));
      res.on('end', () => resolvePromise({ status: res.statusCode ?? 0, headers: res.headers, body: Buffer.concat(chunks) }));
    });
    req.on('error', reject);
    req.end(body);
  });
}

describe('startLoopbackServer', () => {
  let dir: string;
  let server: LoopbackServer;
  const auth = (): Record<string, string> => ({ 'X-Annula-Token': server.token });
  const json = (r: Reply): { ok: boolean; value?: unknown; error?: { code: string; message: string } } => JSON.parse(r.body.toString());

  beforeAll(async () => {
    dir = await mkdtemp(join(tmpdir(), 'annula-server-'));
    await mkdir(join(dir, 'renderer', 'assets'), { recursive: true });
    await writeFile(join(dir, 'renderer', 'index.html'), '<!doctype html><title>t</title>');
    await writeFile(join(dir, 'renderer', 'assets', 'analysis-worker-abc123.js'), 'self.onmessage = () => {};');
    await writeFile(join(dir, 'secret.txt'), 'outside the renderer');
    server = await startLoopbackServer({ rendererDir: join(dir, 'renderer'), context: { samplesDir, storePath: join(dir, 'no-store.sqlite') } });
  });
  afterAll(async () => {
    await server.close();
    await rm(dir, { recursive: true, force: true });
  });

  it('listens on 127.0.0.1 with a 43-character token in its address', () => {
    expect(server.url).toMatch(/^http:\/\/127\.0\.0\.1:\d+\/\?token=[\w-]{43}$/);
  });

  it('trades the token in the address for an HttpOnly SameSite=Strict cookie', async () => {
    const r = await call(server.port, 'GET', `/?token=${server.token}`, {});
    expect(r.status).toBe(303);
    expect(r.headers.location).toBe('/');
    expect(String(r.headers['set-cookie'])).toBe(`annula-token=${server.token}; HttpOnly; SameSite=Strict; Path=/`);
    const page = await call(server.port, 'GET', '/', { Cookie: `annula-token=${server.token}` });
    expect(page.status).toBe(200);
    expect(page.body.toString()).toContain('<title>t</title>');
  });

  it('refuses every request without the right token', async () => {
    expect((await call(server.port, 'GET', '/', {})).status).toBe(401);
    expect((await call(server.port, 'GET', '/?token=wrong', {})).status).toBe(401);
    expect((await call(server.port, 'GET', '/', { Cookie: 'annula-token=wrong' })).status).toBe(401);
    expect((await call(server.port, 'POST', '/api/list-samples', { 'Content-Type': 'application/json' }, '{}')).status).toBe(401);
  });

  it('refuses Host headers other than 127.0.0.1 and localhost on its port', async () => {
    for (const host of ['attacker.example', `attacker.example:${server.port}`, `127.0.0.1:${server.port + 1}`, '127.0.0.1']) {
      const r = await call(server.port, 'GET', '/', { ...auth(), Host: host });
      expect(r.status, host).toBe(421);
    }
    expect((await call(server.port, 'GET', '/', { ...auth(), Host: `localhost:${server.port}` })).status).toBe(200);
  });

  it('refuses POSTs from another origin', async () => {
    const r = await call(server.port, 'POST', '/api/list-samples', { ...auth(), 'Content-Type': 'application/json', Origin: 'http://attacker.example' }, '{}');
    expect(r.status).toBe(403);
  });

  it('sends the strict Content-Security-Policy, and the worker its own', async () => {
    const page = await call(server.port, 'GET', '/', auth());
    const csp = String(page.headers['content-security-policy']);
    expect(csp).toContain("default-src 'none'");
    expect(csp).toContain("script-src 'self' 'wasm-unsafe-eval'");
    expect(csp).not.toMatch(/'unsafe-inline'|'unsafe-eval'/);
    expect(page.headers['x-content-type-options']).toBe('nosniff');
    const worker = await call(server.port, 'GET', '/assets/analysis-worker-abc123.js', auth());
    expect(String(worker.headers['content-security-policy'])).toContain("'unsafe-eval'");
    expect(String(worker.headers['content-security-policy'])).toContain('connect-src data:');
  });

  it('never serves files outside the renderer folder', async () => {
    for (const path of ['/../secret.txt', '/%2e%2e/secret.txt', '/assets/../../secret.txt', '/.hidden']) {
      const r = await call(server.port, 'GET', path, auth());
      expect(r.status, path).toBe(404);
      expect(r.body.toString()).not.toContain('outside the renderer');
    }
  });

  it('runs list-samples and read-sample over POST /api', async () => {
    const list = await call(server.port, 'POST', '/api/list-samples', { ...auth(), 'Content-Type': 'application/json' }, '{}');
    expect(list.status).toBe(200);
    const ids = (json(list).value as Array<{ id: string }>).map((s) => s.id);
    expect(ids).toEqual(expect.arrayContaining(['gold-standard', 'tin-coating']));
    const sample = await call(server.port, 'POST', '/api/read-sample', { ...auth(), 'Content-Type': 'application/json' }, JSON.stringify({ id: 'gold-standard' }));
    expect(sample.status).toBe(200);
    expect(sample.headers['content-type']).toBe('application/octet-stream');
    const meta = JSON.parse(decodeURIComponent(String(sample.headers['x-annula-meta'])));
    expect(meta.byteLength).toBe(sample.body.length);
    expect([...sample.body.subarray(0, 4)]).toEqual([0x49, 0x49, 0x2a, 0x00]); // little-endian TIFF magic (TIFF 6.0, section 2)
    expect(meta.sample.camera.voltage).toBe('200kV');
  });

  it('answers a malformed request with what is wrong and what to do', async () => {
    const bad = await call(server.port, 'POST', '/api/read-sample', { ...auth(), 'Content-Type': 'application/json' }, JSON.stringify({ id: '../../etc' }));
    expect(bad.status).toBe(400);
    expect(json(bad).error!.code).toBe('invalid-input');
    expect(json(bad).error!.message).toMatch(/^read-sample: id: .*gold-standard.*; /);
    const notJson = await call(server.port, 'POST', '/api/list-samples', { ...auth(), 'Content-Type': 'application/json' }, '{oops');
    expect(notJson.status).toBe(400);
    expect(json(notJson).error!.message).toMatch(/not valid JSON/);
    const wrongType = await call(server.port, 'POST', '/api/list-samples', { ...auth(), 'Content-Type': 'text/plain' }, '{}');
    expect(wrongType.status).toBe(400);
    const extra = await call(server.port, 'POST', '/api/list-samples', { ...auth(), 'Content-Type': 'application/json' }, JSON.stringify({ surprise: 1 }));
    expect(extra.status).toBe(400);
    const missing = await call(server.port, 'POST', '/api/read-sample', { ...auth(), 'Content-Type': 'application/json' }, JSON.stringify({ id: 'no-such-sample' }));
    expect(missing.status).toBe(404);
    expect(json(missing).error!.message).toBe('there is no sample "no-such-sample"; choose one of the bundled samples');
  });

  it('names an unknown handler, and serves save-calibration with its schema', async () => {
    const unknown = await call(server.port, 'POST', '/api/format-disk', { ...auth(), 'Content-Type': 'application/json' }, '{}');
    expect(unknown.status).toBe(404);
    expect(json(unknown).error!.code).toBe('unknown-handler');
    const empty = await call(server.port, 'POST', '/api/save-calibration', { ...auth(), 'Content-Type': 'application/json' }, '{}');
    expect(empty.status).toBe(400);
    expect(json(empty).error!.message).toMatch(/save-calibration: calibration/);
  });

  it('never writes a file in browser mode: exports are downloads', async () => {
    const r = await call(server.port, 'POST', '/api/write-report', { ...auth(), 'Content-Type': 'application/json' }, JSON.stringify({ path: join(samplesDir, 'x.pdf'), bytes: [1] }));
    expect(r.status).toBe(400);
    expect(json(r).error!.code).toBe('invalid-input');
  });

  it('never reads a path in browser mode', async () => {
    const r = await call(server.port, 'POST', '/api/read-chosen-image', { ...auth(), 'Content-Type': 'application/json' }, JSON.stringify({ path: join(samplesDir, 'gold-standard', 'pattern.tif') }));
    expect(r.status).toBe(403);
    expect(json(r).error!.code).toBe('not-allowed');
  });

  it('fingerprints uploaded bytes on the raw route', async () => {
    const r = await call(server.port, 'POST', '/api/raw/fingerprint-image?name=abc.tif', { ...auth(), 'Content-Type': 'application/octet-stream' }, Buffer.from('abc'));
    expect(r.status).toBe(200);
    // FIPS 180-2, appendix B.1: SHA-256("abc").
    expect(json(r).value).toEqual({ name: 'abc.tif', byteLength: 3, sha256: 'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad' });
    const jsonOnly = await call(server.port, 'POST', '/api/raw/list-samples', { ...auth(), 'Content-Type': 'application/octet-stream' }, Buffer.from('abc'));
    expect(jsonOnly.status).toBe(400);
  });

  it('lists no calibrations when there is no store yet, and says so', async () => {
    const r = await call(server.port, 'POST', '/api/list-calibrations', { ...auth(), 'Content-Type': 'application/json' }, '{}');
    expect(json(r).value).toEqual({ storePath: join(dir, 'no-store.sqlite'), storeFound: false, calibrations: [] });
    const find = await call(server.port, 'POST', '/api/find-calibration', { ...auth(), 'Content-Type': 'application/json' }, JSON.stringify({ name: 'TEM-2' }));
    expect(find.status).toBe(404);
  });
});
