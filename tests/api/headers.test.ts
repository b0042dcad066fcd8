/**
 * Security headers on the API and on the web app's pages (OWASP Secure
 * Headers Project; W3C CSP Level 3 frame-ancestors; RFC 9111 no-store).
 */
import request from 'supertest';
import { signUp, startTestApp } from '../helpers/app';
import type { Running } from '../../server/boot';

let running: Running;
beforeAll(async () => {
  running = await startTestApp();
});
afterAll(async () => {
  await running.close();
});

function expectSecurityHeaders(headers: Record<string, string>) {
  expect(headers['content-security-policy']).toContain("default-src 'self'");
  expect(headers['content-security-policy']).toContain("frame-ancestors 'none'");
  expect(headers['content-security-policy']).toContain("object-src 'none'");
  expect(headers['x-frame-options']).toBe('DENY');
  expect(headers['x-content-type-options']).toBe('nosniff');
  expect(headers['referrer-policy']).toBe('no-referrer');
  expect(headers['x-powered-by']).toBeUndefined();
}

test('API answers carry the security headers and Cache-Control: no-store, signed in or not, errors included', async () => {
  const health = await request(running.app).get('/api/health');
  expectSecurityHeaders(health.headers);
  expect(health.headers['cache-control']).toBe('no-store');
  const anonymous = await request(running.app).get('/api/me');
  expect(anonymous.status).toBe(401);
  expect(anonymous.headers['cache-control']).toBe('no-store');
  const { agent, labId } = await signUp(running, 'headers');
  const members = await agent.get(`/api/labs/${labId}/members`);
  expect(members.status).toBe(200);
  expectSecurityHeaders(members.headers);
  expect(members.headers['cache-control']).toBe('no-store');
});

test('the web app pages carry the same policy', async () => {
  const page = await request(running.app).get('/invite/some-token');
  expectSecurityHeaders(page.headers);
});
