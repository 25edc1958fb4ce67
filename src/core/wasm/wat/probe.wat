;; The SIMD probe: one f64x2.splat. WebAssembly.validate of these bytes tells whether this realm
;; has 128-bit SIMD (src/core/wasm/runtime.ts).
(module
  (func $probe (export "probe") (drop (f64x2.splat (f64.const 1)))))
