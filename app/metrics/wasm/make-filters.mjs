#!/usr/bin/env node
// Writes ./filters.wat and ./filters-wasm.ts (the module, base64) from the templates below, with
// wabt (a devDependency): `node app/metrics/wasm/make-filters.mjs`. A unit test checks that the
// committed module is what this script makes.
//
// Two kernels, each over one 2D slice, with 128-bit SIMD two columns at a time (f64x2), every
// pixel computed with the same operations in the same order as the JavaScript passes in
// ../hfen.ts and ../ssim.ts; only the sums over pixels are added up in two lanes.
// - log_slice: the LoG row pass (second derivative and Gaussian along rows, half kernels
//   G0..G7 and D0..D7, borders by the column map) and column pass, and the sums of squares.
// - ssim_slice: the horizontal window sums of x, y, x² + y², xy (half window W0..W5), the
//   vertical sums and the SSIM of each interior pixel, summed (and under the mask).
import { readFileSync, writeFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { createRequire } from 'node:module';

const HERE = fileURLToPath(new URL('.', import.meta.url));
const chain = (terms) => terms.reduce((acc, t) => `(f64x2.add ${acc} ${t})`);
const get = (n) => `(local.get $${n})`;
const load = (addr) => `(v128.load ${addr})`;
const at = (base, delta) => (delta === 0 ? get(base) : delta > 0 ? `(i32.add ${get(base)} (i32.const ${delta}))` : `(i32.sub ${get(base)} (i32.const ${-delta}))`);
const mul = (a, b) => `(f64x2.mul ${a} ${b})`;
const add = (a, b) => `(f64x2.add ${a} ${b})`;
const sub = (a, b) => `(f64x2.sub ${a} ${b})`;
const splat = (ptr, k) => `(f64x2.splat (f64.load offset=${k * 8} ${get(ptr)}))`;
const range = (n) => Array.from({ length: n }, (_, i) => i);

// ---- log_slice ------------------------------------------------------------------------------
const rowTerms = (w) => [mul(get(`${w}0`), get('x0')), ...range(7).map((i) => mul(get(`${w}${i + 1}`), get(`x${i + 1}`)))];
const colSum = (w, base, k) => (k === 0 ? mul(get(`${w}0`), load(`(i32.add ${get(`${base}o`)} ${get('c8')})`))
  : mul(get(`${w}${k}`), add(load(`(i32.add ${get(`${base}u${k}`)} ${get('c8')})`), load(`(i32.add ${get(`${base}v${k}`)} ${get('c8')})`))));
const rowNames = ['u7', 'u6', 'u5', 'u4', 'u3', 'u2', 'u1', 'o', 'v1', 'v2', 'v3', 'v4', 'v5', 'v6', 'v7'];

const logSlice = `
  (func (export "log_slice")
    (param $a i32) (param $b i32) (param $hasB i32) (param $mask i32) (param $hasMask i32)
    (param $R i32) (param $C i32) (param $Cp i32) (param $colMap i32) (param $rowStart i32)
    (param $pad i32) (param $along i32) (param $across i32) (param $w i32) (param $result i32)
    (local $r i32) (local $c i32) (local $i i32) (local $o i32) (local $k i32) (local $m i32) (local $dst i32)
    (local $padLen i32) (local $c8 i32) (local $rs i32) (local $mrow i32) (local $v f64)
    (local $acc0 f64) (local $acc1 f64) (local $macc0 f64) (local $macc1 f64) (local $e v128)
    ${range(8).map((i) => `(local $G${i} v128) (local $D${i} v128)`).join(' ')}
    ${range(8).map((i) => `(local $x${i} v128)`).join(' ')}
    ${rowNames.map((n) => `(local $A${n} i32) (local $B${n} i32)`).join(' ')}
    ${range(8).map((i) => `(local.set $G${i} ${splat('w', i)}) (local.set $D${i} ${splat('w', 8 + i)})`).join('\n    ')}
    (local.set $padLen (i32.add (local.get $C) (i32.const 14)))
    ;; One zero beyond the padded row: the second lane of the last pair of an odd row reads it.
    (f64.store (i32.add (local.get $pad) (i32.shl (local.get $padLen) (i32.const 3))) (f64.const 0))
    (local.set $r (i32.const 0))
    (block $rowsDone (loop $rows
      (br_if $rowsDone (i32.ge_u (local.get $r) (local.get $R)))
      (local.set $o (i32.mul (local.get $r) (local.get $C)))
      (local.set $i (i32.const 0))
      (block $padDone (loop $padding
        (br_if $padDone (i32.ge_u (local.get $i) (local.get $padLen)))
        (local.set $k (i32.shl (i32.add (local.get $o) (i32.load (i32.add (local.get $colMap) (i32.shl (local.get $i) (i32.const 2))))) (i32.const 2)))
        (local.set $v (f64.promote_f32 (f32.load (i32.add (local.get $a) (local.get $k)))))
        (if (local.get $hasB) (then
          (local.set $v (f64.sub (local.get $v) (f64.promote_f32 (f32.load (i32.add (local.get $b) (local.get $k))))))))
        (f64.store (i32.add (local.get $pad) (i32.shl (local.get $i) (i32.const 3))) (local.get $v))
        (local.set $i (i32.add (local.get $i) (i32.const 1)))
        (br $padding)))
      (local.set $c (i32.const 0))
      (block $colsDone (loop $cols
        (br_if $colsDone (i32.ge_u (local.get $c) (local.get $C)))
        (local.set $m (i32.add (local.get $pad) (i32.shl (i32.add (local.get $c) (i32.const 7)) (i32.const 3))))
        (local.set $x0 ${load(get('m'))})
        ${range(7).map((i) => `(local.set $x${i + 1} ${add(load(at('m', -8 * (i + 1))), load(at('m', 8 * (i + 1))))})`).join('\n        ')}
        (local.set $dst (i32.shl (i32.add (i32.mul (local.get $r) (local.get $Cp)) (local.get $c)) (i32.const 3)))
        (v128.store (i32.add (local.get $along) (local.get $dst)) ${chain(rowTerms('D'))})
        (v128.store (i32.add (local.get $across) (local.get $dst)) ${chain(rowTerms('G'))})
        (local.set $c (i32.add (local.get $c) (i32.const 2)))
        (br $cols)))
      (local.set $r (i32.add (local.get $r) (i32.const 1)))
      (br $rows)))
    (local.set $r (i32.const 0))
    (block $rowsDone2 (loop $rows2
      (br_if $rowsDone2 (i32.ge_u (local.get $r) (local.get $R)))
      (local.set $rs (i32.add (local.get $rowStart) (i32.shl (local.get $r) (i32.const 2))))
      ${rowNames.map((n, i) => `(local.set $A${n} (i32.add (local.get $along) (i32.shl (i32.load offset=${i * 4} (local.get $rs)) (i32.const 3))))
      (local.set $B${n} (i32.add (local.get $across) (i32.shl (i32.load offset=${i * 4} (local.get $rs)) (i32.const 3))))`).join('\n      ')}
      (local.set $mrow (i32.add (local.get $mask) (i32.mul (local.get $r) (local.get $C))))
      (local.set $c (i32.const 0))
      (block $colsDone2 (loop $cols2
        (br_if $colsDone2 (i32.ge_u (local.get $c) (local.get $C)))
        (local.set $c8 (i32.shl (local.get $c) (i32.const 3)))
        (local.set $e ${chain([...range(8).map((k) => colSum('G', 'A', k)), ...range(8).map((k) => colSum('D', 'B', k))])})
        (local.set $e (f64x2.mul (local.get $e) (local.get $e)))
        (local.set $acc0 (f64.add (local.get $acc0) (f64x2.extract_lane 0 (local.get $e))))
        (if (local.get $hasMask) (then (if (i32.load8_u (i32.add (local.get $mrow) (local.get $c))) (then
          (local.set $macc0 (f64.add (local.get $macc0) (f64x2.extract_lane 0 (local.get $e))))))))
        (if (i32.lt_u (i32.add (local.get $c) (i32.const 1)) (local.get $C)) (then
          (local.set $acc1 (f64.add (local.get $acc1) (f64x2.extract_lane 1 (local.get $e))))
          (if (local.get $hasMask) (then (if (i32.load8_u offset=1 (i32.add (local.get $mrow) (local.get $c))) (then
            (local.set $macc1 (f64.add (local.get $macc1) (f64x2.extract_lane 1 (local.get $e))))))))))
        (local.set $c (i32.add (local.get $c) (i32.const 2)))
        (br $cols2)))
      (local.set $r (i32.add (local.get $r) (i32.const 1)))
      (br $rows2)))
    (f64.store (local.get $result) (f64.add (local.get $acc0) (local.get $acc1)))
    (f64.store offset=8 (local.get $result) (f64.add (local.get $macc0) (local.get $macc1))))`;

// ---- ssim_slice -----------------------------------------------------------------------------
const hTerms = (src) => [mul(get('W0'), load(get(src))), ...range(5).map((i) => mul(get(`W${i + 1}`), add(load(at(src, -8 * (i + 1))), load(at(src, 8 * (i + 1))))))];
const vTerms = (h) => [mul(get('W0'), load(get(h))), ...range(5).map((i) => mul(get(`W${i + 1}`),
  add(load(`(i32.sub ${get(h)} (i32.mul ${get('s')} (i32.const ${i + 1})))`), load(`(i32.add ${get(h)} (i32.mul ${get('s')} (i32.const ${i + 1})))`))))];
const horizontalLoop = (src, dst, label) => `
      (local.set $j (i32.const 0))
      (block $${label}Done (loop $${label}
        (br_if $${label}Done (i32.ge_u (local.get $j) (local.get $Cv)))
        (local.set $p (i32.add (local.get $${src}) (i32.shl (i32.add (local.get $j) (i32.const 5)) (i32.const 3))))
        (v128.store (i32.add (local.get $${dst}) (i32.shl (i32.add (i32.mul (local.get $r) (local.get $Cvp)) (local.get $j)) (i32.const 3)))
          ${chain(hTerms('p'))})
        (local.set $j (i32.add (local.get $j) (i32.const 2)))
        (br $${label})))`;

const ssimSlice = `
  (func (export "ssim_slice")
    (param $a i32) (param $b i32) (param $mask i32) (param $hasMask i32) (param $R i32) (param $C i32) (param $Cvp i32)
    (param $xr i32) (param $yr i32) (param $qr i32) (param $pr i32) (param $hx i32) (param $hy i32) (param $hq i32) (param $hp i32)
    (param $w i32) (param $c1 f64) (param $c2 f64) (param $result i32)
    (local $r i32) (local $c i32) (local $j i32) (local $o i32) (local $p i32) (local $Cv i32) (local $s i32) (local $at i32) (local $mi i32)
    (local $x f64) (local $y f64) (local $sum0 f64) (local $sum1 f64) (local $ms0 f64) (local $ms1 f64) (local $mc f64)
    (local $W0 v128) (local $W1 v128) (local $W2 v128) (local $W3 v128) (local $W4 v128) (local $W5 v128)
    (local $mx v128) (local $my v128) (local $mxy v128) (local $m2 v128) (local $vp v128) (local $vq v128) (local $val v128)
    (local $C1 v128) (local $C2 v128) (local $two v128)
    (local $Hx i32) (local $Hy i32) (local $Hq i32) (local $Hp i32)
    ${range(6).map((i) => `(local.set $W${i} ${splat('w', i)})`).join(' ')}
    (local.set $C1 (f64x2.splat (local.get $c1)))
    (local.set $C2 (f64x2.splat (local.get $c2)))
    (local.set $two (f64x2.splat (f64.const 2)))
    (local.set $Cv (i32.sub (local.get $C) (i32.const 10)))
    (local.set $r (i32.const 0))
    (block $rowsDone (loop $rows
      (br_if $rowsDone (i32.ge_u (local.get $r) (local.get $R)))
      (local.set $o (i32.mul (local.get $r) (local.get $C)))
      (local.set $c (i32.const 0))
      (block $fillDone (loop $fill
        (br_if $fillDone (i32.ge_u (local.get $c) (local.get $C)))
        (local.set $at (i32.shl (i32.add (local.get $o) (local.get $c)) (i32.const 2)))
        (local.set $x (f64.promote_f32 (f32.load (i32.add (local.get $a) (local.get $at)))))
        (local.set $y (f64.promote_f32 (f32.load (i32.add (local.get $b) (local.get $at)))))
        (local.set $at (i32.shl (local.get $c) (i32.const 3)))
        (f64.store (i32.add (local.get $xr) (local.get $at)) (local.get $x))
        (f64.store (i32.add (local.get $yr) (local.get $at)) (local.get $y))
        (f64.store (i32.add (local.get $qr) (local.get $at)) (f64.add (f64.mul (local.get $x) (local.get $x)) (f64.mul (local.get $y) (local.get $y))))
        (f64.store (i32.add (local.get $pr) (local.get $at)) (f64.mul (local.get $x) (local.get $y)))
        (local.set $c (i32.add (local.get $c) (i32.const 1)))
        (br $fill)))
      ${horizontalLoop('xr', 'hx', 'hxl')}
      ${horizontalLoop('yr', 'hy', 'hyl')}
      ${horizontalLoop('qr', 'hq', 'hql')}
      ${horizontalLoop('pr', 'hp', 'hpl')}
      (local.set $r (i32.add (local.get $r) (i32.const 1)))
      (br $rows)))
    (local.set $s (i32.shl (local.get $Cvp) (i32.const 3)))
    (local.set $r (i32.const 5))
    (block $vDone (loop $vrows
      (br_if $vDone (i32.ge_u (local.get $r) (i32.sub (local.get $R) (i32.const 5))))
      (local.set $j (i32.const 0))
      (block $jDone (loop $jl
        (br_if $jDone (i32.ge_u (local.get $j) (local.get $Cv)))
        (local.set $at (i32.shl (i32.add (i32.mul (local.get $r) (local.get $Cvp)) (local.get $j)) (i32.const 3)))
        (local.set $Hx (i32.add (local.get $hx) (local.get $at)))
        (local.set $Hy (i32.add (local.get $hy) (local.get $at)))
        (local.set $Hq (i32.add (local.get $hq) (local.get $at)))
        (local.set $Hp (i32.add (local.get $hp) (local.get $at)))
        (local.set $mx ${chain(vTerms('Hx'))})
        (local.set $my ${chain(vTerms('Hy'))})
        (local.set $mxy ${mul(get('mx'), get('my'))})
        (local.set $m2 ${add(mul(get('mx'), get('mx')), mul(get('my'), get('my')))})
        (local.set $vp ${chain(vTerms('Hp'))})
        (local.set $vq ${chain(vTerms('Hq'))})
        (local.set $val (f64x2.div
          ${mul(add(mul(get('two'), get('mxy')), get('C1')), add(mul(get('two'), sub(get('vp'), get('mxy'))), get('C2')))}
          ${mul(add(get('m2'), get('C1')), add(sub(get('vq'), get('m2')), get('C2')))}))
        (local.set $mi (i32.add (local.get $mask) (i32.add (i32.mul (local.get $r) (local.get $C)) (i32.add (local.get $j) (i32.const 5)))))
        (local.set $sum0 (f64.add (local.get $sum0) (f64x2.extract_lane 0 (local.get $val))))
        (if (local.get $hasMask) (then (if (i32.load8_u (local.get $mi)) (then
          (local.set $ms0 (f64.add (local.get $ms0) (f64x2.extract_lane 0 (local.get $val))))
          (local.set $mc (f64.add (local.get $mc) (f64.const 1)))))))
        (if (i32.lt_u (i32.add (local.get $j) (i32.const 1)) (local.get $Cv)) (then
          (local.set $sum1 (f64.add (local.get $sum1) (f64x2.extract_lane 1 (local.get $val))))
          (if (local.get $hasMask) (then (if (i32.load8_u offset=1 (local.get $mi)) (then
            (local.set $ms1 (f64.add (local.get $ms1) (f64x2.extract_lane 1 (local.get $val))))
            (local.set $mc (f64.add (local.get $mc) (f64.const 1)))))))))
        (local.set $j (i32.add (local.get $j) (i32.const 2)))
        (br $jl)))
      (local.set $r (i32.add (local.get $r) (i32.const 1)))
      (br $vrows)))
    (f64.store (local.get $result) (f64.add (local.get $sum0) (local.get $sum1)))
    (f64.store offset=8 (local.get $result) (f64.add (local.get $ms0) (local.get $ms1)))
    (f64.store offset=16 (local.get $result) (local.get $mc)))`;

const wat = `;; Generated by make-filters.mjs; do not edit. See that script for what the kernels compute.
(module
  (memory (export "memory") 1)
${logSlice}
${ssimSlice})
`;

export async function makeFilters() {
  const require = createRequire(import.meta.url);
  const wabt = await require('wabt')();
  const module = wabt.parseWat('filters.wat', wat);
  module.validate();
  const { buffer } = module.toBinary({});
  return { wat, wasm: Buffer.from(buffer) };
}

export function moduleSource(wasm) {
  const b64 = wasm.toString('base64');
  const lines = b64.match(/.{1,100}/g) ?? [];
  return `// Generated by make-filters.mjs from filters.wat; do not edit.\nexport const FILTERS_WASM_BASE64 =\n${lines.map((l) => `  '${l}'`).join(' +\n')};\n`;
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  const { wat: text, wasm } = await makeFilters();
  writeFileSync(`${HERE}filters.wat`, text);
  writeFileSync(`${HERE}filters-wasm.ts`, moduleSource(wasm));
  console.log(`filters.wasm: ${wasm.length} bytes`);
}
void readFileSync;
