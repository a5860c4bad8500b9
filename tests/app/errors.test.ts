/** Error answers: malformed JSON, invalid input, unknown ids and paths, all as {error: {code, message}}. */
import { beforeAll, describe, expect, it } from 'vitest';
import { call, callJson, signUp } from './support/harness';

let me: { cookie: string; id: string };
let projectId: string;

beforeAll(async () => {
  me = await signUp('Ida', 'ida@example.test');
  projectId = (await callJson('POST', '/api/projects', { cookie: me.cookie, json: { name: 'Errors' } })).body.project.id;
});

describe('malformed and invalid input', () => {
  it.each([
    ['POST', '/api/projects'],
    ['PATCH', '/api/projects/{p}'],
    ['POST', '/api/projects/{p}/members'],
    ['POST', '/api/projects/{p}/netlists'],
  ])('%s %s with malformed JSON answers 400 invalid_json', async (method, path) => {
    const res = await callJson(method, path.replace('{p}', projectId), {
      cookie: me.cookie,
      body: '{"name": "unterminated',
      headers: { 'content-type': 'application/json' },
    });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('invalid_json');
    expect(res.body.error.message).toMatch(/not valid JSON/);
  });

  it('an empty body is malformed too', async () => {
    const res = await callJson('POST', '/api/projects', { cookie: me.cookie, body: '', headers: { 'content-type': 'application/json' } });
    expect(res.status).toBe(400);
  });

  it('names the field and the rule when validation fails', async () => {
    const res = await callJson('POST', `/api/projects/${projectId}/netlists`, { cookie: me.cookie, json: { name: 'bad name!', width: 0, kind: 'wallace' } });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('invalid_input');
    const paths = res.body.error.details.map((d: { path: string }) => d.path);
    expect(paths).toEqual(expect.arrayContaining(['name', 'width', 'kind']));
    expect(res.body.error.message).toContain('width');
  });

  it('refuses unknown fields', async () => {
    const res = await callJson('POST', '/api/projects', { cookie: me.cookie, json: { name: 'x', owner: 'someone-else' } });
    expect(res.status).toBe(400);
  });

  it('refuses a body that is not JSON', async () => {
    const res = await callJson('POST', '/api/projects', {
      cookie: me.cookie,
      body: 'name=x',
      headers: { 'content-type': 'application/x-www-form-urlencoded' },
    });
    expect(res.status).toBe(415);
  });

  it('refuses a duplicate netlist name with 409', async () => {
    const body = { name: 'dup', width: 8, kind: 'ripple-carry' };
    expect((await callJson('POST', `/api/projects/${projectId}/netlists`, { cookie: me.cookie, json: body })).status).toBe(201);
    expect((await callJson('POST', `/api/projects/${projectId}/netlists`, { cookie: me.cookie, json: body })).status).toBe(409);
  });
});

describe('unknown ids answer 404', () => {
  const missing = '00000000-0000-4000-8000-000000000000';
  it.each([
    ['GET', `/api/projects/${missing}`],
    ['PATCH', `/api/projects/${missing}`],
    ['DELETE', `/api/projects/${missing}`],
    ['GET', `/api/projects/${missing}/members`],
    ['GET', `/api/projects/${missing}/netlists`],
    ['GET', `/api/projects/${missing}/audit`],
    ['GET', `/api/netlists/${missing}`],
    ['GET', `/api/netlists/${missing}/revisions`],
    ['POST', `/api/netlists/${missing}/revisions`],
    ['GET', `/api/revisions/${missing}`],
    ['GET', `/api/revisions/${missing}/runs`],
    ['GET', `/api/runs/${missing}`],
    ['GET', `/api/revisions/${missing}/reviews`],
    ['GET', `/api/reviews/${missing}`],
  ])('%s %s', async (method, path) => {
    const res = await callJson(method, path, { cookie: me.cookie, ...(method !== 'GET' && method !== 'DELETE' && { json: { name: 'x' } }) });
    expect(res.status).toBe(404);
    expect(res.body.error.code).toBe('not_found');
  });

  it('a member id that is not a member', async () => {
    const res = await callJson('PATCH', `/api/projects/${projectId}/members/${missing}`, { cookie: me.cookie, json: { role: 'viewer' } });
    expect(res.status).toBe(404);
  });

  it('a method a path does not take answers 405 in JSON with Allow', async () => {
    const res = await call('PUT', '/api/projects', { cookie: me.cookie, json: {} });
    expect(res.status).toBe(405);
    expect(res.headers.get('allow')).toBe('GET, POST');
    expect(((await res.json()) as { error: { code: string } }).error.code).toBe('method_not_allowed');
  });

  it('an unknown API path', async () => {
    const res = await call('GET', '/api/nowhere', { cookie: me.cookie });
    expect(res.status).toBe(404);
    expect(res.headers.get('content-type')).toContain('application/json');
  });
});
