// The short binding names of scripts/bindings.mjs on a module made for the test: a function and a
// memory imported, a function exported that calls the import, and one export without a hash.
// The renamed module must still validate, link to the renamed glue names and compute the same.
import { test } from 'node:test';
import assert from 'node:assert/strict';
import { shortenBindings } from '../../scripts/bindings.mjs';

const HASHED_IMPORT = '__wbg_answer_0123456789abcdef';
const HASHED_EXPORT = 'run__h0123456789abcdef';

function name(text) {
  const bytes = [...Buffer.from(text, 'utf8')];
  return [bytes.length, ...bytes];
}

function section(id, body) {
  return [id, body.length, ...body];
}

/** A module importing m.<HASHED_IMPORT> (() -> i32) and m.memory, exporting <HASHED_EXPORT> and
 * `keep`, both the function that returns the import's answer plus one. */
function module() {
  return Buffer.from([
    0x00, 0x61, 0x73, 0x6d, 0x01, 0x00, 0x00, 0x00,
    ...section(1, [1, 0x60, 0, 1, 0x7f]),
    ...section(2, [2, ...name('m'), ...name(HASHED_IMPORT), 0, 0, ...name('m'), ...name('memory'), 2, 0, 1]),
    ...section(3, [1, 0]),
    ...section(7, [2, ...name(HASHED_EXPORT), 0, 1, ...name('keep'), 0, 1]),
    // call 0; i32.const 1; i32.add
    ...section(10, [1, 7, 0, 0x10, 0, 0x41, 1, 0x6a, 0x0b]),
  ]);
}

const glue = `const imports = { m: { ${HASHED_IMPORT}: () => 41 } };\nexport const run = () => wasm.${HASHED_EXPORT}();\n`;

test('hashed binding names become short in the module and the glue alike', async () => {
  const before = module();
  assert.ok(WebAssembly.validate(before), 'the test module itself is valid');
  const out = shortenBindings(glue, before);
  assert.equal(out.renamed, 2);
  assert.ok(!out.js.includes(HASHED_IMPORT) && !out.js.includes(HASHED_EXPORT));
  const compiled = await WebAssembly.compile(out.wasm);
  const imports = WebAssembly.Module.imports(compiled).map((i) => i.name);
  const exports = WebAssembly.Module.exports(compiled).map((e) => e.name);
  // The unhashed names stay; the hashed ones are the short names the glue now uses.
  assert.equal(imports[1], 'memory');
  assert.equal(exports[1], 'keep');
  assert.match(imports[0], /^_[0-9a-z]+$/);
  assert.match(exports[0], /^_[0-9a-z]+$/);
  assert.ok(out.js.includes(`${imports[0]}: () => 41`), out.js);
  assert.ok(out.js.includes(`wasm.${exports[0]}()`), out.js);
  const memory = new WebAssembly.Memory({ initial: 1 });
  const { exports: api } = await WebAssembly.instantiate(compiled, {
    m: { [imports[0]]: () => 41, memory },
  });
  assert.equal(api[exports[0]](), 42);
  assert.equal(api.keep(), 42);
});

test('a short name never takes one the glue already uses', () => {
  const out = shortenBindings(`const _0 = 1, _1 = 2; ${glue}`, module());
  const used = new Set(out.js.match(/\b_[0-9a-z]+\b/g));
  assert.ok(used.has('_0') && used.has('_1'));
  assert.ok(!out.js.includes(`_0: () => 41`) && !out.js.includes('wasm._1()'), out.js);
});
