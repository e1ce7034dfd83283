import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { brotliDecompressSync, gunzipSync } from 'node:zlib';
import { expect } from 'chai';
import { decodeBundle } from '@shared/engine';
import type { CreatedApp } from '../../api/src/app';
import { REPO_ROOT } from '../../api/src/config';
import { createPartnerKey, signUpAndSignIn } from './support/accounts';
import { startTestApp } from './support/test-app';

interface RawResponse {
  status: number;
  headers: http.IncomingHttpHeaders;
  /** the body exactly as it came over the wire, still compressed */
  body: Buffer;
}

/** One request with no client-side decompression, so the test sees the bytes the server sent. */
function rawRequest(base: string, method: string, urlPath: string, headers: Record<string, string> = {}, body?: string): Promise<RawResponse> {
  return new Promise((resolve, reject) => {
    const req = http.request(new URL(urlPath, base), { method, headers }, (res) => {
      const chunks: Buffer[] = [];
      res.on('data', (chunk: Buffer) => chunks.push(chunk));
      res.on('end', () => resolve({ status: res.statusCode ?? 0, headers: res.headers, body: Buffer.concat(chunks) }));
    });
    req.on('error', reject);
    req.end(body);
  });
}

const HASHED_SCRIPT = 'main-ABCD2345.js';
const SCRIPT = `export const words = ${JSON.stringify(Array.from({ length: 200 }, (_, i) => `trait-${i % 17}`))};\n`;
const INDEX = `<!doctype html><html lang="en"><head><title>Sylvasift</title><script src="${HASHED_SCRIPT}" type="module"></script></head><body><sv-root></sv-root>${' '.repeat(400)}</body></html>`;

describe('api: delivery (compression and cache lifetimes)', function () {
  this.timeout(60_000);
  let created: CreatedApp;
  let server: http.Server;
  let base: string;
  let webRoot: string;

  before(async () => {
    // A small built app, precompressed by the same script the build runs.
    webRoot = fs.mkdtempSync(path.join(os.tmpdir(), 'sylvasift-delivery-'));
    fs.writeFileSync(path.join(webRoot, HASHED_SCRIPT), SCRIPT);
    fs.writeFileSync(path.join(webRoot, 'index.html'), INDEX);
    execFileSync(process.execPath, ['--import', 'tsx', path.join(REPO_ROOT, 'scripts/precompress-web.ts'), webRoot], { cwd: REPO_ROOT, stdio: 'pipe' });
    created = await startTestApp({ WEB_ROOT: webRoot });
    server = await new Promise((resolve) => {
      const listening = created.app.listen(0, '127.0.0.1', () => resolve(listening));
    });
    base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  });
  after(async () => {
    await new Promise<void>((resolve) => server?.close(() => resolve()));
    await created?.close();
    if (webRoot) fs.rmSync(webRoot, { recursive: true, force: true });
  });

  describe('the built app', () => {
    it('sends a hashed script brotli-compressed, for a year, immutable, with its compressed length', async () => {
      const res = await rawRequest(base, 'GET', `/${HASHED_SCRIPT}`, { 'Accept-Encoding': 'gzip, deflate, br' });
      expect(res.status).to.equal(200);
      expect(res.headers['content-encoding']).to.equal('br');
      expect(res.headers['vary']).to.match(/Accept-Encoding/i);
      expect(res.headers['content-type']).to.match(/javascript/);
      // A year and immutable for content-hashed names: RFC 8246 (immutable), RFC 9111 §5.2.2.1 (max-age).
      expect(res.headers['cache-control']).to.equal('public, max-age=31536000, immutable');
      expect(Number(res.headers['content-length'])).to.equal(res.body.byteLength);
      expect(res.body.byteLength).to.be.lessThan(Buffer.byteLength(SCRIPT));
      expect(brotliDecompressSync(res.body).toString('utf8')).to.equal(SCRIPT);
    });

    it('sends gzip to a browser that takes no brotli, and the file itself to one that takes neither', async () => {
      const gzip = await rawRequest(base, 'GET', `/${HASHED_SCRIPT}`, { 'Accept-Encoding': 'gzip' });
      expect(gzip.headers['content-encoding']).to.equal('gzip');
      expect(gunzipSync(gzip.body).toString('utf8')).to.equal(SCRIPT);
      const plain = await rawRequest(base, 'GET', `/${HASHED_SCRIPT}`, { 'Accept-Encoding': 'identity' });
      expect(plain.headers['content-encoding']).to.equal(undefined);
      expect(plain.body.toString('utf8')).to.equal(SCRIPT);
      expect(plain.headers['vary']).to.match(/Accept-Encoding/i);
    });

    it('revalidates index.html every time (no-cache), for deep links too', async () => {
      for (const urlPath of ['/index.html', '/', '/sift']) {
        const res = await rawRequest(base, 'GET', urlPath, { Accept: 'text/html', 'Accept-Encoding': 'br' });
        expect(res.status, urlPath).to.equal(200);
        expect(res.headers['cache-control'], urlPath).to.equal('no-cache');
        expect(res.headers['content-encoding'], urlPath).to.equal('br');
        expect(res.headers['content-type'], urlPath).to.match(/text\/html/);
        expect(brotliDecompressSync(res.body).toString('utf8'), urlPath).to.equal(INDEX);
      }
    });

    it('sends a file replaced without its compressed copies as the new file, never the stale copy', async () => {
      const file = path.join(webRoot, 'index.html');
      const html = INDEX.replace('<sv-root>', '<sv-root data-build="2">');
      fs.writeFileSync(file, html);
      try {
        const res = await rawRequest(base, 'GET', '/index.html', { 'Accept-Encoding': 'br' });
        expect(res.headers['content-encoding']).to.equal(undefined);
        expect(res.body.toString('utf8')).to.equal(html);
      } finally {
        fs.writeFileSync(file, INDEX);
        execFileSync(process.execPath, ['--import', 'tsx', path.join(REPO_ROOT, 'scripts/precompress-web.ts'), webRoot], { cwd: REPO_ROOT, stdio: 'pipe' });
      }
    });
  });

  describe('the edition bundle', () => {
    it('comes compressed with a tag of its own, decodes to the same bundle, and answers its tag with 304', async () => {
      const plain = await rawRequest(base, 'GET', '/api/v1/editions/current/bundle', { 'Accept-Encoding': 'identity' });
      expect(plain.status).to.equal(200);
      expect(plain.headers['etag']).to.match(/^"edition-1-/);
      const br = await rawRequest(base, 'GET', '/api/v1/editions/current/bundle', { 'Accept-Encoding': 'br, gzip' });
      expect(br.status).to.equal(200);
      expect(br.headers['content-encoding']).to.equal('br');
      expect(br.headers['vary']).to.match(/Accept-Encoding/i);
      expect(br.headers['etag']).to.equal((plain.headers['etag'] as string).replace(/"$/, '-br"'));
      expect(Number(br.headers['content-length'])).to.equal(br.body.byteLength);
      // The bundle is column-major bitmasks and ranges: it shrinks to well under half (measured: about a seventh).
      expect(br.body.byteLength).to.be.lessThan(plain.body.byteLength / 2);
      expect(brotliDecompressSync(br.body).equals(plain.body)).to.equal(true);
      expect(decodeBundle(new Uint8Array(brotliDecompressSync(br.body))).taxonCount).to.be.greaterThan(0);
      for (const tag of [br.headers['etag'] as string, plain.headers['etag'] as string]) {
        const again = await rawRequest(base, 'GET', '/api/v1/editions/current/bundle', { 'Accept-Encoding': 'br', 'If-None-Match': tag });
        expect(again.status, tag).to.equal(304);
        expect(again.body.byteLength).to.equal(0);
      }
      expect(br.headers['cache-control']).to.match(/must-revalidate/);
    });
  });

  describe('dynamic answers', () => {
    it('compresses a large JSON answer and leaves identify answers as they are', async () => {
      const traits = await rawRequest(base, 'GET', '/api/v1/traits', { 'Accept-Encoding': 'br' });
      expect(traits.status).to.equal(200);
      expect(traits.headers['content-encoding']).to.equal('br');
      expect(JSON.parse(brotliDecompressSync(traits.body).toString('utf8'))).to.have.property('traits');

      const user = await signUpAndSignIn(created, 'learner');
      const { key } = await createPartnerKey(created, user.token, ['identify']);
      const identify = await rawRequest(
        base,
        'POST',
        '/api/v1/identify',
        { 'Accept-Encoding': 'br, gzip', Authorization: `Bearer ${key}`, 'Content-Type': 'application/json' },
        JSON.stringify({ observations: [{ trait: 'needles-per-fascicle', values: [5] }] }),
      );
      expect(identify.status).to.equal(200);
      expect(identify.headers['content-encoding']).to.equal(undefined);
      expect(JSON.parse(identify.body.toString('utf8'))).to.have.property('candidates');
    });
  });
});
