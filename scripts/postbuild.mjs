// Trunk post-build hook (see Trunk.toml), run with Trunk's staging folder in TRUNK_STAGING_DIR.
// 1. Moves Trunk's inline module loader into a file of its own, because the page's
//    Content-Security-Policy allows scripts from the app's own origin only.
// 2. Shortens the names that wasm-bindgen gives the module's imports and exports
//    (scripts/bindings.mjs).
// 3. Writes the service worker's list of files and a hash of their contents, so each build has
//    its own cache and the worker drops older ones when it activates.
import { createHash } from 'node:crypto';
import { readFileSync, writeFileSync, readdirSync, statSync } from 'node:fs';
import { join, relative } from 'node:path';
import { shortenBindings } from './bindings.mjs';

const dir = process.env.TRUNK_STAGING_DIR;
if (!dir) {
  console.error('postbuild: TRUNK_STAGING_DIR is not set (run through trunk)');
  process.exit(1);
}

const indexPath = join(dir, 'index.html');
let html = readFileSync(indexPath, 'utf8');
// Trunk's minifier drops the quotes of attribute values, so each pattern takes them as optional.
const inline = /<script type="?module"?([^>]*)>([\s\S]*?)<\/script>/g;
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

// The module's imports and exports get short names in the module and its glue alike
// (scripts/bindings.mjs), and the page's integrity hashes are worked out again for both files.
function shortenBindingNames() {
  const names = readdirSync(dir);
  const jsFile = names.find((f) => /^tapline-app-[0-9a-f]+\.js$/.test(f));
  const wasmFile = names.find((f) => /_bg\.wasm$/.test(f));
  if (!jsFile || !wasmFile) {
    console.error('postbuild: the app\'s module or its glue is missing from the build');
    process.exit(1);
  }
  const out = shortenBindings(readFileSync(join(dir, jsFile), 'utf8'), readFileSync(join(dir, wasmFile)));
  writeFileSync(join(dir, wasmFile), out.wasm);
  writeFileSync(join(dir, jsFile), out.js);
  for (const file of [jsFile, wasmFile]) {
    const digest = createHash('sha384').update(readFileSync(join(dir, file))).digest('base64');
    const link = new RegExp(`(href="?\\./${file.replace(/[.]/g, '\\.')}"?[^>]*integrity="?)sha384-[^"\\s>]*`);
    if (!link.test(html)) {
      console.error(`postbuild: index.html has no integrity for ${file}`);
      process.exit(1);
    }
    html = html.replace(link, `$1sha384-${digest}`);
  }
  console.log(`postbuild: ${out.renamed} binding names shortened`);
}

shortenBindingNames();
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
