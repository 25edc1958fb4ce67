/**
 * The security policy arrives as HTTP headers on every response of the served build (page and
 * numerics workers), with nosniff, frame protection and cross-origin isolation, and holds inside the workers: a request to
 * another origin is refused by the policy (a securitypolicyviolation for connect-src; before the
 * headers, the workers ran with no policy and the request went out). String eval is forbidden by the
 * same script-src, but cannot be probed here: code evaluated through the DevTools protocol is exempt.
 * The built page carries no development-only script hash.
 */
import { expect, test } from '@playwright/test';
import { open } from './helpers.ts';

test('headers on the page and the worker scripts; the policy holds inside a worker', async ({ page }) => {
  const responses: { url: string; headers: Record<string, string> }[] = [];
  page.on('response', (r) => responses.push({ url: r.url(), headers: r.headers() }));
  await open(page);
  const doc = responses.find((r) => new URL(r.url).pathname === '/')!;
  expect(doc).toBeDefined();
  expect(doc.headers['content-security-policy']).toMatch(/default-src 'self'/);
  expect(doc.headers['content-security-policy']).toMatch(/frame-ancestors 'none'/);
  expect(doc.headers['content-security-policy']).not.toMatch(/sha256-/);
  expect(doc.headers['x-content-type-options']).toBe('nosniff');
  expect(doc.headers['x-frame-options']).toBe('DENY');
  // Cross-origin isolated, so the numerics worker and its pool threads share one buffer of covariance products.
  expect(doc.headers['cross-origin-opener-policy']).toBe('same-origin');
  expect(doc.headers['cross-origin-embedder-policy']).toBe('require-corp');
  expect(await page.evaluate(() => self.crossOriginIsolated)).toBe(true);
  const html = await page.content();
  expect(html).not.toMatch(/sha256-/);

  const workerScripts = responses.filter((r) => /worker/i.test(new URL(r.url).pathname) && r.url.endsWith('.js'));
  expect(workerScripts.length).toBeGreaterThan(0);
  for (const w of workerScripts) expect(w.headers['content-security-policy'], w.url).toMatch(/script-src 'self' 'wasm-unsafe-eval'(;|$)/);

  const workers = page.workers();
  expect(workers.length).toBeGreaterThan(0);
  const probe = await workers[0].evaluate(async () => {
    const violations: string[] = [];
    self.addEventListener('securitypolicyviolation', (e) => violations.push((e as SecurityPolicyViolationEvent).effectiveDirective));
    let fetchResult = 'ran';
    try {
      await fetch('http://127.0.0.1:9/');
    } catch {
      fetchResult = 'failed';
    }
    await new Promise((r) => setTimeout(r, 100));
    return { fetchResult, violations };
  });
  expect(probe.fetchResult).toBe('failed');
  expect(probe.violations).toContain('connect-src');
});
