import { defineConfig, type Plugin } from 'vitest/config';
import react from '@vitejs/plugin-react';

/**
 * The page's security policy, served as HTTP headers by the dev server and `vite preview` (and to be
 * served the same way in production: README "Deploying"). Headers cover every response, so the
 * numerics workers run under the policy too (a dedicated worker loaded from a URL takes the policy
 * of its own response). Only our own origin; 'unsafe-inline' styles because plotly.js injects
 * <style> elements; 'wasm-unsafe-eval' lets the numeric kernels compile their WebAssembly
 * (src/core/wasm; WebAssembly compilation only, never JavaScript eval).
 */
const POLICY = [
  "default-src 'self'",
  "script-src 'self' 'wasm-unsafe-eval'",
  "worker-src 'self' blob:",
  "style-src 'self' 'unsafe-inline'",
  "img-src 'self' data: blob:",
  "font-src 'self' data:",
  "connect-src 'self'",
  "object-src 'none'",
  "base-uri 'none'",
  "form-action 'none'",
];
/**
 * The development server only: the React fast-refresh preamble that @vitejs/plugin-react inlines
 * (its hash). The built page has no inline script and does not carry it.
 */
const DEV_PREAMBLE = "'sha256-Z2/iFzh9VMlVkEOar1f/oSHWwQk3ve1qk/C2WdsC4Xk='";

/** The policy in force: as a header it also forbids framing (frame-ancestors works only as a header). */
export function contentSecurityPolicy(mode: 'dev' | 'build', as: 'header' | 'meta' = 'header'): string {
  const p = POLICY.map((d) => (mode === 'dev' && d.startsWith('script-src') ? `${d} ${DEV_PREAMBLE}` : d));
  if (as === 'header') p.push("frame-ancestors 'none'");
  return p.join('; ');
}

/**
 * Headers of every response (dev server and preview; README "Deploying" lists them for other servers). The two
 * cross-origin headers make the page cross-origin isolated, which lets the numerics worker and its pool threads
 * write one SharedArrayBuffer (src/core/parallel/products.ts: Bᵀ written in place instead of each thread's rows
 * copied into it, about 0.4 s for a 32³ grid with 1,000 data on the project machine); without them the copy path runs.
 */
export function securityHeaders(mode: 'dev' | 'build'): Record<string, string> {
  return {
    'Content-Security-Policy': contentSecurityPolicy(mode),
    'X-Content-Type-Options': 'nosniff',
    'X-Frame-Options': 'DENY',
    'Referrer-Policy': 'no-referrer',
    'Cross-Origin-Opener-Policy': 'same-origin',
    'Cross-Origin-Embedder-Policy': 'require-corp',
  };
}

/**
 * The built page also carries the policy as a <meta> tag, for hosts that cannot set headers
 * (a copy of the files opened from a static server); the development server relies on its headers.
 */
function policyMeta(): Plugin {
  return {
    name: 'priorscope-policy-meta',
    transformIndexHtml(html, ctx) {
      if (ctx.server) return html;
      return html.replace(
        '<head>',
        `<head>\n    <meta http-equiv="Content-Security-Policy" content="${contentSecurityPolicy('build', 'meta')}" />`,
      );
    },
  };
}

export default defineConfig({
  plugins: [react(), policyMeta()],
  worker: { format: 'es' },
  server: { port: 5173, headers: securityHeaders('dev') },
  preview: { headers: securityHeaders('build') },
  test: {
    include: ['test/**/*.test.ts'],
    environment: 'node',
    testTimeout: 60_000,
    hookTimeout: 60_000,
  },
});
