/**
 * Reviews: a designer asks for sign-off of one exact revision; a reviewer
 * (or owner) other than the requester approves or rejects it. A decision is
 * final; a new request starts a new review.
 */
import crypto from 'node:crypto';
import { and, desc, eq } from 'drizzle-orm';
import { alias } from 'drizzle-orm/sqlite-core';
import { z } from 'zod';
import type { Db } from '../db';
import { reviews, revisions, user } from '../db/schema';
import { decideReviewBody, reviewComment } from '../rules';
import { can, roleIn } from './access';
import { recordAudit } from './audit';
import { revisionRef } from './revisions';
import { fail, idParams, json, route } from './http';

export const requestReviewBody = z.object({ reviewerId: z.string().trim().min(1).max(100).optional(), comment: reviewComment.default('') }).strict();

const requester = alias(user, 'requester');
const reviewer = alias(user, 'reviewer');

async function reviewRows(db: Db, where: ReturnType<typeof eq>) {
  return db
    .select({
      id: reviews.id,
      revisionId: reviews.revisionId,
      revisionNumber: revisions.number,
      contentHash: revisions.contentHash,
      state: reviews.state,
      comment: reviews.comment,
      requesterId: reviews.requesterId,
      requesterName: requester.name,
      reviewerId: reviews.reviewerId,
      reviewerName: reviewer.name,
      createdAt: reviews.createdAt,
      decidedAt: reviews.decidedAt,
    })
    .from(reviews)
    .innerJoin(revisions, eq(revisions.id, reviews.revisionId))
    .leftJoin(requester, eq(requester.id, reviews.requesterId))
    .leftJoin(reviewer, eq(reviewer.id, reviews.reviewerId))
    .where(where)
    .orderBy(desc(reviews.createdAt));
}

export const listReviews = route({ params: idParams, scope: { type: 'revision', need: 'read' } }, async ({ db, params }) => ({
  reviews: await reviewRows(db, eq(reviews.revisionId, params.id)),
}));

export const requestReview = route(
  { params: idParams, body: requestReviewBody, scope: { type: 'revision', need: 'edit' } },
  async ({ db, params, body, user: me, scope }) => {
    const open = await db
      .select({ state: reviews.state })
      .from(reviews)
      .where(and(eq(reviews.revisionId, params.id), eq(reviews.state, 'requested')))
      .get();
    if (open) throw fail.conflict('A review of this revision is already open; wait for the decision or withdraw it.');
    const approved = await db
      .select({ id: reviews.id })
      .from(reviews)
      .where(and(eq(reviews.revisionId, params.id), eq(reviews.state, 'approved')))
      .get();
    if (approved) throw fail.conflict('This revision is already approved.');
    if (body.reviewerId) {
      if (body.reviewerId === me.id) throw fail.invalid('reviewerId: you cannot review your own request; name someone else.');
      const role = await roleIn(db, scope.projectId!, body.reviewerId);
      if (!can(role, 'review')) throw fail.invalid('reviewerId: that person is not a reviewer or owner of this project.');
    }
    const id = crypto.randomUUID();
    await db.transaction(async (tx) => {
      await tx.insert(reviews).values({
        id,
        revisionId: params.id,
        requesterId: me.id,
        reviewerId: body.reviewerId ?? null,
        state: 'requested',
        comment: body.comment,
        createdAt: new Date(),
      });
      await recordAudit(tx, {
        projectId: scope.projectId,
        actorId: me.id,
        action: 'review.requested',
        objectType: 'review',
        objectId: id,
        details: { ...(await revisionRef(tx, params.id)), reviewerId: body.reviewerId ?? null },
      });
    });
    const [review] = await reviewRows(db, eq(reviews.id, id));
    return json({ review }, 201);
  },
);

/** Approve or reject (reviewers and owners, not the requester), or withdraw (the requester). */
export const decideReview = route(
  { params: idParams, body: decideReviewBody, scope: { type: 'review', need: 'read' } },
  async ({ db, params, body, user: me, scope }) => {
    const r = await db.select().from(reviews).where(eq(reviews.id, params.id)).get();
    if (!r) throw fail.notFound('review', params.id);
    if (r.state !== 'requested') throw fail.conflict(`This review is already ${r.state}; a decision is final. Request a new review instead.`);
    if (body.state === 'withdrawn') {
      if (r.requesterId !== me.id && scope.role !== 'owner') throw fail.forbidden('Only the person who asked for the review, or an owner, may withdraw it.');
    } else {
      if (!can(scope.role, 'review')) throw fail.forbidden(`Your role here is ${scope.role}; only reviewers and owners approve or reject.`);
      // Sign-off needs a second pair of eyes.
      if (r.requesterId === me.id) throw fail.forbidden('You asked for this review; someone else must decide it.');
    }
    await db.transaction(async (tx) => {
      await tx
        .update(reviews)
        .set({ state: body.state, comment: body.comment || r.comment, reviewerId: body.state === 'withdrawn' ? r.reviewerId : me.id, decidedAt: new Date() })
        .where(eq(reviews.id, r.id));
      await recordAudit(tx, {
        projectId: scope.projectId,
        actorId: me.id,
        action: `review.${body.state}`,
        objectType: 'review',
        objectId: r.id,
        details: await revisionRef(tx, r.revisionId),
      });
    });
    const [review] = await reviewRows(db, eq(reviews.id, r.id));
    return { review };
  },
);

export const getReview = route({ params: idParams, scope: { type: 'review', need: 'read' } }, async ({ db, params }) => {
  const [review] = await reviewRows(db, eq(reviews.id, params.id));
  return { review };
});
