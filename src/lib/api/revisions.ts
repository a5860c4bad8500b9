/**
 * Revisions: the exact text of a netlist at one moment, numbered r1, r2, …
 * per netlist, hashed with SHA-256 and never changed afterwards. They come
 * from a JSON body or an uploaded .v / .json file of at most 2 MiB of UTF-8
 * text that the engine can read (a parse error is refused with its line and
 * column); lint findings travel with the revision rather than refusing it.
 */
import crypto from 'node:crypto';
import { desc, eq } from 'drizzle-orm';
import { z } from 'zod';
import type { Db } from '../db';
import { netlists, revisions, user } from '../db/schema';
import { MAX_REVISION_BYTES, REVISION_FORMATS, REVISION_SUFFIXES, revisionMessage as message, type RevisionFormat } from '../rules';
import { EngineError } from '../../engine/errors';
import { checkNetlist, checkStoredNetlist, type NetlistCheck } from '../netlist-check';
import { recordAudit } from './audit';
import { fail, idParams, json, methodNotAllowed, parseWith, readBodyLimited, readJson, route } from './http';

/** Room for multipart boundaries and the other form fields around the file. */
const MULTIPART_OVERHEAD = 64 * 1024;
/** JSON escaping (\n, \", \uXXXX) can grow text up to 6×; cap the envelope, then the decoded content exactly. */
const JSON_ENVELOPE_LIMIT = 6 * MAX_REVISION_BYTES + MULTIPART_OVERHEAD;

const filename = z
  .string()
  .trim()
  .min(1)
  .max(200, 'keep the file name to 200 characters or fewer')
  .refine((n) => !/[\\/\0]/.test(n), 'give a plain file name without folders');

export const createRevisionJsonBody = z
  .object({
    content: z.string({ error: 'content must be the netlist text as a string' }),
    format: z.enum(REVISION_FORMATS, { error: `format must be one of ${REVISION_FORMATS.join(', ')}` }).optional(),
    filename: filename.optional(),
    message: message.default(''),
  })
  .strict();

function formatFromName(name: string): RevisionFormat {
  const dot = name.lastIndexOf('.');
  const suffix = dot < 0 ? '' : name.slice(dot).toLowerCase();
  const f = REVISION_SUFFIXES[suffix];
  if (!f) throw fail.invalid(`The file "${name}" has an unsupported suffix; upload a Verilog netlist (.v) or a JSON netlist (.json).`);
  return f;
}

/** The checks every revision passes, whichever way it arrived. */
export function checkRevisionText(bytes: Uint8Array, format: RevisionFormat, label: string): string {
  if (bytes.byteLength > MAX_REVISION_BYTES) throw fail.tooLarge(MAX_REVISION_BYTES);
  if (bytes.byteLength === 0) throw fail.invalid(`${label} is empty; upload the netlist text.`);
  let text: string;
  try {
    text = new TextDecoder('utf-8', { fatal: true }).decode(bytes);
  } catch {
    throw fail.invalid(`${label} is not UTF-8 text; save it as UTF-8 and upload it again.`);
  }
  const nul = text.indexOf('\0');
  if (nul >= 0) throw fail.invalid(`${label} contains a NUL byte at offset ${nul}; it looks binary, not a text netlist.`);
  return text;
}

/** Refuses a netlist the engine cannot read, quoting the engine's message (file, line, column, what was expected). */
function readableNetlist(inc: Incoming, label: string): NetlistCheck {
  try {
    return checkNetlist(inc.content, inc.format, inc.filename);
  } catch (e) {
    if (!(e instanceof EngineError)) throw e;
    throw fail.invalid(`${label} is not a netlist Skiplane can read: ${e.message}`);
  }
}

interface Incoming {
  content: string;
  format: RevisionFormat;
  filename: string | null;
  message: string;
}

async function readIncoming(request: Request): Promise<Incoming & { check: NetlistCheck }> {
  const type = request.headers.get('content-type') ?? '';
  if (/^multipart\/form-data\b/i.test(type)) {
    const bytes = await readBodyLimited(request, MAX_REVISION_BYTES + MULTIPART_OVERHEAD, MAX_REVISION_BYTES);
    let form: FormData;
    try {
      form = await new Request('http://local/', { method: 'POST', headers: { 'content-type': type }, body: bytes }).formData();
    } catch {
      throw fail.invalid('The multipart body could not be read; send the netlist as a form field named "file".');
    }
    const file = form.get('file');
    if (!(file instanceof File)) throw fail.invalid('The form has no file: attach the netlist as a field named "file".');
    const name = parseWith(filename, file.name || '');
    const format = formatFromName(name);
    if (file.size > MAX_REVISION_BYTES) throw fail.tooLarge(MAX_REVISION_BYTES);
    const content = checkRevisionText(new Uint8Array(await file.arrayBuffer()), format, `The file "${name}"`);
    const msg = parseWith(message, String(form.get('message') ?? ''));
    const inc = { content, format, filename: name, message: msg };
    return { ...inc, check: readableNetlist(inc, `The file "${name}"`) };
  }
  const body = parseWith(createRevisionJsonBody, await readJson(request, JSON_ENVELOPE_LIMIT, MAX_REVISION_BYTES));
  const byName = body.filename ? formatFromName(body.filename) : undefined;
  if (byName && body.format && byName !== body.format) {
    throw fail.invalid(`format is "${body.format}" but the file name "${body.filename}" says ${byName}; make them agree.`);
  }
  const format = body.format ?? byName;
  if (!format) throw fail.invalid('Say what the content is: set format to "verilog" or "json", or give a filename ending in .v or .json.');
  const content = checkRevisionText(new TextEncoder().encode(body.content), format, 'content');
  const inc = { content, format, filename: body.filename ?? null, message: body.message };
  return { ...inc, check: readableNetlist(inc, 'content') };
}

export { MAX_REVISION_BYTES };

/** How audit events name a revision: its id, number and netlist, so the trail reads without lookups. */
export async function revisionRef(db: Pick<Db, 'select'>, revisionId: string) {
  const r = await db
    .select({ number: revisions.number, netlist: netlists.name })
    .from(revisions)
    .innerJoin(netlists, eq(netlists.id, revisions.netlistId))
    .where(eq(revisions.id, revisionId))
    .get();
  return { revisionId, number: r?.number ?? null, netlist: r?.netlist ?? null };
}

export const sha256 = (text: string) => crypto.createHash('sha256').update(text, 'utf8').digest('hex');

export interface NewRevision {
  id: string;
  projectId: string | null;
  netlistId: string;
  netlistName: string | null;
  number: number;
  format: RevisionFormat;
  filename: string | null;
  message: string;
  content: string;
  authorId: string;
  createdAt: Date;
}

/** Store a revision (hash and size from its content) and its audit event; the upload route and the demo seed both use it. */
export async function recordRevision(tx: Pick<Db, 'insert'>, r: NewRevision): Promise<void> {
  const contentHash = sha256(r.content);
  await tx.insert(revisions).values({
    id: r.id,
    netlistId: r.netlistId,
    number: r.number,
    format: r.format,
    filename: r.filename,
    message: r.message,
    content: r.content,
    contentHash,
    sizeBytes: Buffer.byteLength(r.content, 'utf8'),
    authorId: r.authorId,
    createdAt: r.createdAt,
  });
  await recordAudit(tx, {
    projectId: r.projectId,
    actorId: r.authorId,
    action: 'revision.created',
    objectType: 'revision',
    objectId: r.id,
    details: { netlistId: r.netlistId, netlist: r.netlistName, number: r.number, contentHash, format: r.format },
  });
}

const summary = {
  id: revisions.id,
  netlistId: revisions.netlistId,
  number: revisions.number,
  format: revisions.format,
  filename: revisions.filename,
  message: revisions.message,
  contentHash: revisions.contentHash,
  sizeBytes: revisions.sizeBytes,
  authorId: revisions.authorId,
  authorName: user.name,
  createdAt: revisions.createdAt,
};

export const listRevisions = route({ params: idParams, scope: { type: 'netlist', need: 'read' } }, async ({ db, params }) => ({
  revisions: await db
    .select(summary)
    .from(revisions)
    .leftJoin(user, eq(user.id, revisions.authorId))
    .where(eq(revisions.netlistId, params.id))
    .orderBy(desc(revisions.number)),
}));

export const createRevision = route({ params: idParams, scope: { type: 'netlist', need: 'edit' } }, async ({ db, params, request, user: me, scope }) => {
  const inc = await readIncoming(request);
  const netlistName = (await db.select({ name: netlists.name }).from(netlists).where(eq(netlists.id, params.id)).get())?.name ?? null;
  const hash = sha256(inc.content);
  const id = crypto.randomUUID();
  const number = await db.transaction(async (tx) => {
    const latest = await tx
      .select({ number: revisions.number, hash: revisions.contentHash })
      .from(revisions)
      .where(eq(revisions.netlistId, params.id))
      .orderBy(desc(revisions.number))
      .get();
    if (latest?.hash === hash) throw fail.conflict(`This content is identical to r${latest.number}; nothing to record.`);
    const n = (latest?.number ?? 0) + 1;
    await recordRevision(tx, {
      id,
      projectId: scope.projectId,
      netlistId: params.id,
      netlistName,
      number: n,
      format: inc.format,
      filename: inc.filename,
      message: inc.message,
      content: inc.content,
      authorId: me.id,
      createdAt: new Date(),
    });
    return n;
  });
  const revision = await db.select(summary).from(revisions).leftJoin(user, eq(user.id, revisions.authorId)).where(eq(revisions.id, id)).get();
  return json({ revision: { ...revision, number }, check: inc.check }, 201);
});

export const getRevision = route({ params: idParams, scope: { type: 'revision', need: 'read' } }, async ({ db, params, scope }) => {
  const revision = await db
    .select({ ...summary, content: revisions.content })
    .from(revisions)
    .leftJoin(user, eq(user.id, revisions.authorId))
    .where(eq(revisions.id, params.id))
    .get();
  const check = revision ? checkStoredNetlist(revision.content, revision.format as RevisionFormat, revision.filename) : null;
  return { revision: { ...revision, role: scope.role }, check };
});

export const revisionIsImmutable = methodNotAllowed(
  ['GET'],
  'Revisions are immutable: upload a new revision to the netlist instead of changing or deleting this one.',
);
