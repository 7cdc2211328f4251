// Trunk post-build hook (see Trunk.toml), run with Trunk's staging folder in TRUNK_STAGING_DIR.
// 1. Moves Trunk's inline module loader into a file of its own, because the page's
//    Content-Security-Policy allows scripts from the app's own origin only.
// 2. Writes the service worker's list of files and a hash of their contents, so each build has
//    its own cache and the worker drops older ones when it activates.
import { createHash } from 'node:crypto';
import { readFileSync, writeFileSync, readdirSync, statSync } from 'node:fs';
import { join, relative } from 'node:path';

const dir = process.env.TRUNK_STAGING_DIR;
if (!dir) {
  console.error('postbuild: TRUNK_STAGING_DIR is not set (run through trunk)');
  process.exit(1);
}

const indexPath = join(dir, 'index.html');
let html = readFileSync(indexPath, 'utf8');
const inline = /<script type="module"([^>]*)>([\s\S]*?)<\/script>/g;
html = html.replace(inline, (whole, attrs, body) => {
  if (/\bsrc=/.test(attrs) || body.trim() === '') {
    return whole;
  }
  const hash = createHash('sha256').update(body).digest('hex').slice(0, 16);
  const name = `boot-${hash}.js`;
  writeFileSync(join(dir, name), body.trim() + '\n');
  return `<script type="module" src="./${name}"></script>`;
});
if (/<script(?![^>]*\bsrc=)[^>]*>[\s\S]*?\S[\s\S]*?<\/script>/.test(html)) {
  console.error('postbuild: an inline script is left in index.html; the CSP would block it');
  process.exit(1);
}
writeFileSync(indexPath, html);

function walk(folder) {
  return readdirSync(folder).flatMap((name) => {
    const path = join(folder, name);
    return statSync(path).isDirectory() ? walk(path) : [path];
  });
}

const files = walk(dir)
  .map((p) => relative(dir, p).split('\\').join('/'))
  .filter((p) => p !== 'sw.js')
  .sort();
const hash = createHash('sha256');
for (const f of files) {
  hash.update(f);
  hash.update(readFileSync(join(dir, f)));
}
const build = hash.digest('hex').slice(0, 16);
const urls = ['./', ...files.map((f) => './' + f)];
const swPath = join(dir, 'sw.js');
const sw = readFileSync(swPath, 'utf8')
  .replace("'__TAPLINE_BUILD__'", JSON.stringify(build))
  .replace('__TAPLINE_FILES__', JSON.stringify(urls));
writeFileSync(swPath, sw);
console.log(`postbuild: ${files.length} files cached by service worker build ${build}`);
