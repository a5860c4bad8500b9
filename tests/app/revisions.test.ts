/** Revisions: numbering, hashing, immutability, the upload rules (size, suffix, UTF-8, readable netlist) and the engine's check. */
import crypto from 'node:crypto';
import { beforeAll, describe, expect, it } from 'vitest';
import { generateAdder } from '../../src/engine/generate';
import { writeDesignJson } from '../../src/engine/json';
import { writeVerilog } from '../../src/engine/verilog/write';
import { call, callJson, signUp } from './support/harness';

const MIB2 = 2 * 1024 * 1024;
let designer: { cookie: string; id: string };
let netlistId: string;

const verilog = (tag: string) => `module add1(input a, input b, output s, output cout);\n  assign s = a ^ b;\n  assign cout = a & b; // ${tag}\nendmodule\n`;

function upload(name: string, data: Uint8Array<ArrayBuffer> | string, extra: Record<string, string> = {}) {
  const form = new FormData();
  form.set('file', new File([data], name));
  for (const [k, v] of Object.entries(extra)) form.set(k, v);
  return callJson('POST', `/api/netlists/${netlistId}/revisions`, { cookie: designer.cookie, body: form });
}

/** A file of exactly n bytes of Verilog-ish text. */
/** A readable netlist padded with a comment to exactly n bytes. */
function bigText(n: number): string {
  const head = verilog('big') + '// padding ';
  return head + 'x'.repeat(n - head.length);
}

beforeAll(async () => {
  designer = await signUp('Dee', 'dee@example.test');
  const p = await callJson('POST', '/api/projects', { cookie: designer.cookie, json: { name: 'Rev test' } });
  const n = await callJson('POST', `/api/projects/${p.body.project.id}/netlists`, {
    cookie: designer.cookie,
    json: { name: 'add1', width: 1, kind: 'ripple-carry' },
  });
  expect(n.status).toBe(201);
  netlistId = n.body.netlist.id;
});

describe('revisions', () => {
  it('numbers revisions r1, r2, … and stores the SHA-256 of the content', async () => {
    const a = await callJson('POST', `/api/netlists/${netlistId}/revisions`, { cookie: designer.cookie, json: { content: verilog('one'), format: 'verilog' } });
    expect(a.status).toBe(201);
    expect(a.body.revision.number).toBe(1);
    expect(a.body.revision.contentHash).toBe(crypto.createHash('sha256').update(verilog('one')).digest('hex'));
    const b = await upload('add1.v', verilog('two'), { message: 'second' });
    expect(b.status).toBe(201);
    expect(b.body.revision).toMatchObject({ number: 2, format: 'verilog', filename: 'add1.v', message: 'second' });
    const read = await callJson('GET', `/api/revisions/${b.body.revision.id}`, { cookie: designer.cookie });
    expect(read.body.revision.content).toBe(verilog('two'));
    const list = await callJson('GET', `/api/netlists/${netlistId}/revisions`, { cookie: designer.cookie });
    expect(list.body.revisions.map((r: { number: number }) => r.number)).toEqual([2, 1]);
  });

  it('refuses content identical to the latest revision with 409', async () => {
    const again = await upload('add1.v', verilog('two'));
    expect(again.status).toBe(409);
  });

  it('is immutable: PUT, PATCH and DELETE answer 405 and change nothing', async () => {
    const list = await callJson('GET', `/api/netlists/${netlistId}/revisions`, { cookie: designer.cookie });
    const id = list.body.revisions[0].id;
    for (const method of ['PUT', 'PATCH', 'DELETE']) {
      const res = await call(method, `/api/revisions/${id}`, { cookie: designer.cookie, json: { content: 'changed' } });
      expect(res.status).toBe(405);
      expect(res.headers.get('allow')).toBe('GET');
      expect(((await res.json()) as { error: { code: string } }).error.code).toBe('method_not_allowed');
    }
    const read = await callJson('GET', `/api/revisions/${id}`, { cookie: designer.cookie });
    expect(read.body.revision.content).toBe(verilog('two'));
  });

  it('accepts a .json netlist that parses, and refuses one that does not', async () => {
    const ok = await upload('ripple2.json', writeDesignJson(generateAdder({ arch: 'ripple', width: 2 })));
    expect(ok.status).toBe(201);
    expect(ok.body.revision.format).toBe('json');
    const bad = await upload('broken.json', '{"top": ');
    expect(bad.status).toBe(400);
    expect(bad.body.error.message).toMatch(/not valid JSON/);
  });

  it('refuses a netlist the engine cannot read, quoting file, line and column', async () => {
    const bad = await upload('typo.v', 'module add1(a, b, s);\n  input a, b;\n  output s\n  xor (s, a, b);\nendmodule\n');
    expect(bad.status).toBe(400);
    expect(bad.body.error.message).toMatch(/typo\.v:4:3: expected ';'/);
  });

  it('keeps a revision with lint errors and reports the findings with it', async () => {
    // Reads fine, but `cout` has no driver (SPEC §2: a net with no driver that something reads).
    const text = 'module add1(a, b, cin, s, cout);\n  input a, b, cin;\n  output s, cout;\n  xor #4 (s, a, b, cin);\nendmodule\n';
    const made = await upload('undriven.v', text);
    expect(made.status).toBe(201);
    expect(made.body.check.errors.map((f: { code: string }) => f.code)).toContain('undriven');
    const read = await callJson('GET', `/api/revisions/${made.body.revision.id}`, { cookie: designer.cookie });
    expect(read.body.check.errors[0]).toMatchObject({ code: 'undriven', where: expect.stringContaining('cout') });
    expect(read.body.check.adder).toBeNull();
  });

  it('reports the adder ports of a clean netlist', async () => {
    const made = await upload('skip4.v', writeVerilog(generateAdder({ arch: 'skip', width: 4, block: 2 })));
    expect(made.status).toBe(201);
    expect(made.body.check).toMatchObject({ top: 'skip4_b2', errors: [], adder: { width: 4, a: 'a', b: 'b', cin: 'cin', sum: 's', cout: 'cout' } });
  });

  it('refuses other suffixes, non-UTF-8 bytes and empty files with 400', async () => {
    expect((await upload('add1.sv', verilog('sv'))).status).toBe(400);
    expect((await upload('add1.exe', 'MZ')).status).toBe(400);
    const latin1 = await upload('latin.v', new Uint8Array([0x2f, 0x2f, 0x20, 0xe9, 0x0a]));
    expect(latin1.status).toBe(400);
    expect(latin1.body.error.message).toMatch(/UTF-8/);
    expect((await upload('empty.v', '')).status).toBe(400);
    const noFile = new FormData();
    noFile.set('message', 'no file');
    expect((await callJson('POST', `/api/netlists/${netlistId}/revisions`, { cookie: designer.cookie, body: noFile })).status).toBe(400);
  });

  it('accepts exactly 2 MiB and refuses 2 MiB + 1 byte with 413 (multipart)', async () => {
    const ok = await upload('big.v', bigText(MIB2));
    expect(ok.status).toBe(201);
    expect(ok.body.revision.sizeBytes).toBe(MIB2);
    const over = await upload('bigger.v', bigText(MIB2 + 1));
    expect(over.status).toBe(413);
    expect(over.body.error.code).toBe('payload_too_large');
    expect(over.body.error.message).toContain('2 MiB');
  });

  it('refuses 2 MiB + 1 byte of content in a JSON body with 413', async () => {
    const res = await callJson('POST', `/api/netlists/${netlistId}/revisions`, {
      cookie: designer.cookie,
      json: { content: bigText(MIB2 + 1), format: 'verilog' },
    });
    expect(res.status).toBe(413);
  });

  it('refuses on Content-Length alone, before reading', async () => {
    const res = await callJson('POST', `/api/netlists/${netlistId}/revisions`, {
      cookie: designer.cookie,
      body: 'tiny',
      headers: { 'content-type': 'multipart/form-data; boundary=x', 'content-length': String(50 * 1024 * 1024) },
    });
    expect(res.status).toBe(413);
  });

  it('counts the bytes actually read when Content-Length is absent or lies', async () => {
    const chunk = new Uint8Array(256 * 1024).fill(0x61);
    let sent = 0;
    const stream = new ReadableStream<Uint8Array>({
      pull(ctrl) {
        if (sent >= 40) return ctrl.close();
        sent++;
        ctrl.enqueue(chunk);
      },
    });
    const res = await callJson('POST', `/api/netlists/${netlistId}/revisions`, {
      cookie: designer.cookie,
      body: stream,
      headers: { 'content-type': 'multipart/form-data; boundary=x' },
    });
    expect(res.status).toBe(413);
    expect(sent).toBeLessThan(40);
  });

  it('needs a format or a file name for JSON bodies, and they must agree', async () => {
    const none = await callJson('POST', `/api/netlists/${netlistId}/revisions`, { cookie: designer.cookie, json: { content: verilog('x') } });
    expect(none.status).toBe(400);
    const clash = await callJson('POST', `/api/netlists/${netlistId}/revisions`, {
      cookie: designer.cookie,
      json: { content: verilog('x'), format: 'json', filename: 'a.v' },
    });
    expect(clash.status).toBe(400);
  });
});
