// Trunk post-build hook (see Trunk.toml), run with Trunk's staging folder in TRUNK_STAGING_DIR.
// 1. Moves Trunk's inline module loader into a file of its own, because the page's
//    Content-Security-Policy allows scripts from the app's own origin only.
// 2. Shortens the names that wasm-bindgen gives the module's imports and exports (see
//    shortenBindingNames below).
// 3. Writes the service worker's list of files and a hash of their contents, so each build has
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

// wasm-bindgen names each binding after the function it binds and a 16-digit hash
// (`__wbg_appendChild_d22bc7af6b96b3f1`, `wasm_bindgen__convert__closures_____invoke__h4bf8…`),
// and the module and its JavaScript glue each carry every name. The hashes look random to a
// compressor: about 2 KB of the app's brotli size. Every import and export whose name ends in
// such a hash gets a short name (`_0`, `_1`, …) in both files, and the page's integrity hashes
// are worked out again for the two changed files.
const HASHED = /(?:_|__h)[0-9a-f]{16}(?:_\d+)?$/;

/** Reads the unsigned LEB128 number at `at` of `bytes`; returns it and the offset after it. */
function readLeb(bytes, at) {
  let value = 0;
  let scale = 1;
  let byte;
  do {
    byte = bytes[at++];
    value += (byte & 0x7f) * scale;
    scale *= 128;
  } while (byte & 0x80);
  return [value, at];
}

/** The unsigned LEB128 encoding of `value`. */
function leb(value) {
  const out = [];
  do {
    let byte = value % 128;
    value = Math.floor(value / 128);
    if (value > 0) byte |= 0x80;
    out.push(byte);
  } while (value > 0);
  return out;
}

/** Reads a name (length, UTF-8 bytes) at `at`; returns it and the offset after it. */
function readName(bytes, at) {
  const [length, start] = readLeb(bytes, at);
  return [Buffer.from(bytes.subarray(start, start + length)).toString('utf8'), start + length];
}

function encodeName(name) {
  const utf8 = Buffer.from(name, 'utf8');
  return [...leb(utf8.length), ...utf8];
}

/** The offset after an import's description at `at` (kinds and layouts of the core spec). */
function skipImportDescription(bytes, at) {
  const kind = bytes[at++];
  const limits = (p) => {
    const flags = bytes[p++];
    p = readLeb(bytes, p)[1];
    return flags & 1 ? readLeb(bytes, p)[1] : p;
  };
  switch (kind) {
    case 0: return readLeb(bytes, at)[1]; // function: type index
    case 1: return limits(at + 1); // table: reference type, limits
    case 2: return limits(at); // memory: limits
    case 3: return at + 2; // global: value type, mutability
    case 4: return readLeb(bytes, at + 1)[1]; // tag: attribute, type index
    default: throw new Error(`postbuild: unknown import kind ${kind}`);
  }
}

/** Renames the hashed imports and exports of `wasm` (a Buffer) through `rename`. */
function renameBindings(wasm, rename) {
  const out = [wasm.subarray(0, 8)];
  let at = 8;
  while (at < wasm.length) {
    const id = wasm[at];
    const [size, start] = readLeb(wasm, at + 1);
    const end = start + size;
    if (id !== 2 && id !== 7) {
      out.push(wasm.subarray(at, end));
      at = end;
      continue;
    }
    const [count, first] = readLeb(wasm, start);
    const body = [...leb(count)];
    let p = first;
    for (let k = 0; k < count; k++) {
      if (id === 2) {
        const [module, afterModule] = readName(wasm, p);
        const [field, afterField] = readName(wasm, afterModule);
        const afterDescription = skipImportDescription(wasm, afterField);
        body.push(...encodeName(module), ...encodeName(rename(field)));
        body.push(...wasm.subarray(afterField, afterDescription));
        p = afterDescription;
      } else {
        const [field, afterField] = readName(wasm, p);
        const afterIndex = readLeb(wasm, afterField + 1)[1];
        body.push(...encodeName(rename(field)), ...wasm.subarray(afterField, afterIndex));
        p = afterIndex;
      }
    }
    if (p !== end) throw new Error(`postbuild: section ${id} did not parse to its end`);
    out.push(Buffer.from([id, ...leb(body.length), ...body]));
    at = end;
  }
  return Buffer.concat(out);
}

function shortenBindingNames() {
  const names = readdirSync(dir);
  const jsFile = names.find((f) => /^tapline-app-[0-9a-f]+\.js$/.test(f));
  const wasmFile = names.find((f) => /_bg\.wasm$/.test(f));
  if (!jsFile || !wasmFile) {
    console.error('postbuild: the app\'s module or its glue is missing from the build');
    process.exit(1);
  }
  let js = readFileSync(join(dir, jsFile), 'utf8');
  const taken = new Set(js.match(/[A-Za-z_$][\w$]*/g));
  const short = new Map();
  let next = 0;
  const rename = (name) => {
    if (!HASHED.test(name)) return name;
    if (!short.has(name)) {
      let candidate;
      do candidate = `_${(next++).toString(36)}`; while (taken.has(candidate));
      short.set(name, candidate);
    }
    return short.get(name);
  };
  const wasm = renameBindings(readFileSync(join(dir, wasmFile)), rename);
  js = js.replace(/[A-Za-z_$][\w$]*/g, (word) => short.get(word) ?? word);
  writeFileSync(join(dir, wasmFile), wasm);
  writeFileSync(join(dir, jsFile), js);
  for (const file of [jsFile, wasmFile]) {
    const digest = createHash('sha384').update(readFileSync(join(dir, file))).digest('base64');
    const link = new RegExp(`(href="?\\./${file.replace(/[.]/g, '\\.')}"?[^>]*integrity="?)sha384-[^"\\s>]*`);
    if (!link.test(html)) {
      console.error(`postbuild: index.html has no integrity for ${file}`);
      process.exit(1);
    }
    html = html.replace(link, `$1sha384-${digest}`);
  }
  console.log(`postbuild: ${short.size} binding names shortened`);
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
