// Short names for the bindings between the app's WebAssembly module and its JavaScript glue.
//
// wasm-bindgen names each binding after the function it binds and a 16-digit hash
// (`__wbg_appendChild_d22bc7af6b96b3f1`, `wasm_bindgen__convert__closures_____invoke__h4bf8…`),
// and the module and its glue each carry every name. The hashes look random to a compressor:
// about 2 KB of the app's brotli size. `shortenBindings` gives every import and export whose name
// ends in such a hash a short name (`_0`, `_1`, …) in both. Used by scripts/postbuild.mjs; tested
// by tests/build/bindings.test.mjs on a module made for the test.

const HASHED = /(?:_|__h)[0-9a-f]{16}(?:_\d+)?$/;
const WORD = /[A-Za-z_$][\w$]*/g;

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
    default: throw new Error(`bindings: unknown import kind ${kind}`);
  }
}

/** `wasm` (a Buffer) with each import's and export's name passed through `rename`; every other
 * section is copied as it is. */
export function renameBindings(wasm, rename) {
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
    if (p !== end) throw new Error(`bindings: section ${id} did not parse to its end`);
    out.push(Buffer.from([id, ...leb(body.length), ...body]));
    at = end;
  }
  return Buffer.concat(out);
}

/** The glue `js` and the module `wasm` with every hashed binding name shortened alike: returns
 * `{ js, wasm, renamed }`. A short name is never one the glue already uses. */
export function shortenBindings(js, wasm) {
  const taken = new Set(js.match(WORD));
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
  const renamed = renameBindings(wasm, rename);
  return {
    js: js.replace(WORD, (word) => short.get(word) ?? word),
    wasm: renamed,
    renamed: short.size,
  };
}
