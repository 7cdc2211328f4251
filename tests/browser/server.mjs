// A tiny static file server for the built app (dist/), on 127.0.0.1 only. Serves .wasm as
// application/wasm so streaming compilation works. Used by the browser tests and scripts/serve.
import { createServer } from 'node:http';
import { readFile, stat } from 'node:fs/promises';
import { extname, join, normalize, resolve } from 'node:path';

const TYPES = {
  '.html': 'text/html; charset=utf-8',
  '.js': 'text/javascript; charset=utf-8',
  '.mjs': 'text/javascript; charset=utf-8',
  '.css': 'text/css; charset=utf-8',
  '.wasm': 'application/wasm',
  '.json': 'application/json',
  '.webmanifest': 'application/manifest+json',
  '.png': 'image/png',
  '.svg': 'image/svg+xml',
};

/** Starts serving `root` on 127.0.0.1:`port` (0 picks a free port) under the sub-path `prefix`
 *  (as a static host would serve the app from a folder); resolves to the server. */
export function serve(root, port = 0, prefix = '/') {
  const base = resolve(root);
  const server = createServer(async (req, res) => {
    try {
      const url = new URL(req.url, 'http://127.0.0.1');
      if (!url.pathname.startsWith(prefix)) {
        res.writeHead(404).end('not found');
        return;
      }
      let path = normalize(join(base, decodeURIComponent(url.pathname.slice(prefix.length - 1))));
      if (!path.startsWith(base)) {
        res.writeHead(403).end();
        return;
      }
      if ((await stat(path).catch(() => null))?.isDirectory()) {
        path = join(path, 'index.html');
      }
      const body = await readFile(path);
      res.writeHead(200, {
        'content-type': TYPES[extname(path)] ?? 'application/octet-stream',
        'cache-control': 'no-cache',
      });
      res.end(body);
    } catch {
      res.writeHead(404).end('not found');
    }
  });
  return new Promise((ok) => server.listen(port, '127.0.0.1', () => ok(server)));
}

// Run directly: node tests/browser/server.mjs DIST PORT
if (process.argv[1] && process.argv[1].endsWith('server.mjs')) {
  const root = process.argv[2] ?? 'dist';
  const port = Number(process.argv[3] ?? 8080);
  serve(root, port).then((s) => console.log(`Tapline is at http://127.0.0.1:${s.address().port}/`));
}
