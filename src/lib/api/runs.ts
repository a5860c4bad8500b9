/**
 * Runs: one check of one revision (equivalence, proof, slowest-vector
 * search, sweep), carried out in the browser worker or on the server by the
 * engine. This records the request; the engine reports progress and result.
 */
import crypto from 'node:crypto';
import { desc, eq } from 'drizzle-orm';
import { z } from 'zod';
import { ENGINE_VERSION } from '../../engine/model';
import { runs, user } from '../db/schema';
import { runKind, runPlace, seedText } from '../rules';
import { recordAudit } from './audit';
import { revisionRef } from './revisions';
import { idParams, json, route } from './http';

export const createRunBody = z
  .object({
    kind: runKind,
    parameters: z.record(z.string(), z.unknown()).default({}),
    seed: z
      .union([seedText, z.number().int().nonnegative().max(Number.MAX_SAFE_INTEGER)])
      .transform(String)
      .optional(),
    place: runPlace.default('server'),
  })
  .strict()
  .refine((b) => JSON.stringify(b.parameters).length <= 16 * 1024, { message: 'parameters must be at most 16 KiB of JSON', path: ['parameters'] });

const columns = {
  id: runs.id,
  revisionId: runs.revisionId,
  kind: runs.kind,
  parameters: runs.parameters,
  seed: runs.seed,
  status: runs.status,
  progress: runs.progress,
  result: runs.result,
  engineVersion: runs.engineVersion,
  place: runs.place,
  createdBy: runs.createdBy,
  createdByName: user.name,
  createdAt: runs.createdAt,
  startedAt: runs.startedAt,
  finishedAt: runs.finishedAt,
};

export const listRuns = route({ params: idParams, scope: { type: 'revision', need: 'read' } }, async ({ db, params }) => ({
  runs: await db.select(columns).from(runs).leftJoin(user, eq(user.id, runs.createdBy)).where(eq(runs.revisionId, params.id)).orderBy(desc(runs.createdAt)),
}));

export const createRun = route(
  { params: idParams, body: createRunBody, scope: { type: 'revision', need: 'edit' } },
  async ({ db, params, body, user: me, scope }) => {
    const id = crypto.randomUUID();
    await db.transaction(async (tx) => {
      await tx.insert(runs).values({
        id,
        revisionId: params.id,
        kind: body.kind,
        parameters: body.parameters,
        seed: body.seed ?? null,
        status: 'queued',
        progress: 0,
        result: null,
        engineVersion: ENGINE_VERSION,
        place: body.place,
        createdBy: me.id,
        createdAt: new Date(),
      });
      await recordAudit(tx, {
        projectId: scope.projectId,
        actorId: me.id,
        action: 'run.created',
        objectType: 'run',
        objectId: id,
        details: { ...(await revisionRef(tx, params.id)), kind: body.kind, place: body.place },
      });
    });
    const run = await db.select(columns).from(runs).leftJoin(user, eq(user.id, runs.createdBy)).where(eq(runs.id, id)).get();
    return json({ run }, 201);
  },
);

export const getRun = route({ params: idParams, scope: { type: 'run', need: 'read' } }, async ({ db, params }) => ({
  run: await db.select(columns).from(runs).leftJoin(user, eq(user.id, runs.createdBy)).where(eq(runs.id, params.id)).get(),
}));
