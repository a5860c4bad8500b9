/**
 * Members and invitations. Owners invite by e-mail (the message carries a
 * one-time link), change roles and remove members; a project always keeps
 * at least one owner.
 */
import crypto from 'node:crypto';
import { and, asc, eq, gt, isNull, sql } from 'drizzle-orm';
import { z } from 'zod';
import type { Db } from '../db';
import { invitations, memberships, projects, user, type Role } from '../db/schema';
import { changeRoleBody, inviteBody } from '../rules';
import { publicOrigin } from '../env';
import { sendMail } from '../mail';
import { can, roleIn } from './access';
import { recordAudit } from './audit';
import { ApiError, fail, idParam, idParams, json, route } from './http';

export const INVITATION_DAYS = 7;

const memberParams = z.object({ id: idParam, userId: idParam });
const invitationParams = z.object({ id: idParam, invitationId: idParam });
const tokenParams = z.object({ token: z.string().trim().min(20, 'the invitation link is incomplete').max(200) });

export const hashToken = (token: string) => crypto.createHash('sha256').update(token).digest('hex');

async function ownerCount(db: Db, projectId: string): Promise<number> {
  const r = await db
    .select({ n: sql<number>`count(*)` })
    .from(memberships)
    .where(and(eq(memberships.projectId, projectId), eq(memberships.role, 'owner')))
    .get();
  return r?.n ?? 0;
}

export const listMembers = route({ params: idParams, scope: { type: 'project', need: 'read' } }, async ({ db, params, scope }) => {
  const members = await db
    .select({ userId: user.id, name: user.name, email: user.email, role: memberships.role, joinedAt: memberships.createdAt })
    .from(memberships)
    .innerJoin(user, eq(user.id, memberships.userId))
    .where(eq(memberships.projectId, params.id))
    .orderBy(asc(user.name));
  // Pending invitations name outside e-mail addresses: only owners see them.
  const pending = can(scope.role, 'manage')
    ? await db
        .select({ id: invitations.id, email: invitations.email, role: invitations.role, createdAt: invitations.createdAt, expiresAt: invitations.expiresAt })
        .from(invitations)
        .where(and(eq(invitations.projectId, params.id), isNull(invitations.acceptedAt), isNull(invitations.revokedAt), gt(invitations.expiresAt, new Date())))
        .orderBy(asc(invitations.createdAt))
    : [];
  return { members, invitations: pending };
});

export const inviteMember = route(
  { params: idParams, body: inviteBody, scope: { type: 'project', need: 'manage' } },
  async ({ db, params, body, user: me }) => {
    const existing = await db
      .select({ id: user.id })
      .from(user)
      .innerJoin(memberships, and(eq(memberships.userId, user.id), eq(memberships.projectId, params.id)))
      .where(sql`lower(${user.email}) = ${body.email}`)
      .get();
    if (existing) throw fail.conflict(`${body.email} is already a member of this project; change their role instead.`);
    const pending = await db
      .select({ id: invitations.id })
      .from(invitations)
      .where(
        and(
          eq(invitations.projectId, params.id),
          eq(invitations.email, body.email),
          isNull(invitations.acceptedAt),
          isNull(invitations.revokedAt),
          gt(invitations.expiresAt, new Date()),
        ),
      )
      .get();
    if (pending) throw fail.conflict(`An invitation to ${body.email} is already pending; revoke it first to send a new one.`);

    const project = await db.select({ name: projects.name }).from(projects).where(eq(projects.id, params.id)).get();
    const token = crypto.randomBytes(32).toString('base64url');
    const id = crypto.randomUUID();
    const now = new Date();
    const expiresAt = new Date(now.getTime() + INVITATION_DAYS * 24 * 3600 * 1000);
    await db.transaction(async (tx) => {
      await tx
        .insert(invitations)
        .values({ id, projectId: params.id, email: body.email, role: body.role, tokenHash: hashToken(token), invitedBy: me.id, createdAt: now, expiresAt });
      await recordAudit(tx, {
        projectId: params.id,
        actorId: me.id,
        action: 'member.invited',
        objectType: 'invitation',
        objectId: id,
        details: { email: body.email, role: body.role },
      });
    });
    const link = `${publicOrigin()}/invite/${token}`;
    await mailOrExplain({
      to: body.email,
      subject: `${me.name} invites you to "${project?.name}" on Skiplane`,
      text:
        `Hello,\n\n${me.name} (${me.email}) invites you to the Skiplane project "${project?.name}" as ${body.role}.\n\n` +
        `To accept, open this link and sign in or create an account with this e-mail address (${body.email}):\n\n${link}\n\n` +
        `The link works once and expires in ${INVITATION_DAYS} days.\n`,
    });
    return json({ invitation: { id, email: body.email, role: body.role, createdAt: now, expiresAt } }, 201);
  },
);

/** The invitation is already saved when mail fails: say so, and how to retry. */
async function mailOrExplain(mail: Parameters<typeof sendMail>[0]) {
  try {
    await sendMail(mail);
  } catch (e) {
    console.error('[mail]', e);
    throw new ApiError(
      502,
      'mail_failed',
      `The invitation is saved, but the e-mail to ${mail.to} could not be sent (${(e as Error).message}). Check SMTP_URL, then revoke the invitation and invite again.`,
    );
  }
}

export const changeMemberRole = route(
  { params: memberParams, body: changeRoleBody, scope: { type: 'project', need: 'manage' } },
  async ({ db, params, body, user: me }) => {
    const current = await roleIn(db, params.id, params.userId);
    if (!current) throw fail.notFound('member', params.userId);
    if (current === body.role) return { member: { userId: params.userId, role: current } };
    if (current === 'owner' && (await ownerCount(db, params.id)) <= 1) {
      throw fail.conflict('This is the only owner; make someone else owner first.');
    }
    await db.transaction(async (tx) => {
      await tx
        .update(memberships)
        .set({ role: body.role })
        .where(and(eq(memberships.projectId, params.id), eq(memberships.userId, params.userId)));
      await recordAudit(tx, {
        projectId: params.id,
        actorId: me.id,
        action: 'member.role_changed',
        objectType: 'member',
        objectId: params.userId,
        details: { from: current, to: body.role },
      });
    });
    return { member: { userId: params.userId, role: body.role } };
  },
);

/** Owners remove anyone; every member may leave on their own. */
export const removeMember = route({ params: memberParams, scope: { type: 'project', need: 'read' } }, async ({ db, params, user: me, scope }) => {
  if (params.userId !== me.id && !can(scope.role, 'manage')) {
    throw fail.forbidden(`Your role here is ${scope.role}; only owners remove other members.`);
  }
  const current = await roleIn(db, params.id, params.userId);
  if (!current) throw fail.notFound('member', params.userId);
  if (current === 'owner' && (await ownerCount(db, params.id)) <= 1) {
    throw fail.conflict('This is the only owner; make someone else owner first, or delete the project.');
  }
  await db.transaction(async (tx) => {
    await tx.delete(memberships).where(and(eq(memberships.projectId, params.id), eq(memberships.userId, params.userId)));
    await recordAudit(tx, {
      projectId: params.id,
      actorId: me.id,
      action: params.userId === me.id ? 'member.left' : 'member.removed',
      objectType: 'member',
      objectId: params.userId,
      details: { role: current },
    });
  });
  return { removed: { userId: params.userId } };
});

export const revokeInvitation = route({ params: invitationParams, scope: { type: 'project', need: 'manage' } }, async ({ db, params, user: me }) => {
  const inv = await db
    .select()
    .from(invitations)
    .where(and(eq(invitations.id, params.invitationId), eq(invitations.projectId, params.id)))
    .get();
  if (!inv) throw fail.notFound('invitation', params.invitationId);
  if (inv.acceptedAt) throw fail.conflict('This invitation was already accepted; remove the member instead.');
  if (inv.revokedAt) return { revoked: { id: inv.id } };
  await db.transaction(async (tx) => {
    await tx.update(invitations).set({ revokedAt: new Date() }).where(eq(invitations.id, inv.id));
    await recordAudit(tx, {
      projectId: params.id,
      actorId: me.id,
      action: 'invitation.revoked',
      objectType: 'invitation',
      objectId: inv.id,
      details: { email: inv.email },
    });
  });
  return { revoked: { id: inv.id } };
});

type InvitationStatus = 'pending' | 'accepted' | 'revoked' | 'expired';

async function findInvitation(db: Db, token: string) {
  const inv = await db
    .select({
      id: invitations.id,
      projectId: invitations.projectId,
      projectName: projects.name,
      email: invitations.email,
      role: invitations.role,
      expiresAt: invitations.expiresAt,
      acceptedAt: invitations.acceptedAt,
      revokedAt: invitations.revokedAt,
      invitedByName: user.name,
    })
    .from(invitations)
    .innerJoin(projects, eq(projects.id, invitations.projectId))
    .leftJoin(user, eq(user.id, invitations.invitedBy))
    .where(eq(invitations.tokenHash, hashToken(token)))
    .get();
  if (!inv) throw new ApiError(404, 'not_found', 'This invitation link is not valid; ask the project owner for a new one.');
  const status: InvitationStatus = inv.acceptedAt ? 'accepted' : inv.revokedAt ? 'revoked' : inv.expiresAt.getTime() < Date.now() ? 'expired' : 'pending';
  return { ...inv, status };
}

export const getInvitation = route({ params: tokenParams }, async ({ db, params }) => {
  const { id, projectId, projectName, email: to, role: r, expiresAt, status, invitedByName } = await findInvitation(db, params.token);
  return { invitation: { id, projectId, projectName, email: to, role: r, expiresAt, status, invitedByName } };
});

export const acceptInvitation = route({ params: tokenParams }, async ({ db, params, user: me }) => {
  const inv = await findInvitation(db, params.token);
  if (inv.status !== 'pending') throw fail.conflict(`This invitation is ${inv.status}; ask the project owner for a new one.`);
  if (inv.email.toLowerCase() !== me.email.toLowerCase()) {
    throw fail.forbidden(`This invitation is for ${inv.email}, but you are signed in as ${me.email}. Sign in with the invited address.`);
  }
  const already = await roleIn(db, inv.projectId, me.id);
  if (already) throw fail.conflict(`You are already a member of "${inv.projectName}" as ${already}.`);
  const r: Role = inv.role;
  await db.transaction(async (tx) => {
    await tx.insert(memberships).values({ projectId: inv.projectId, userId: me.id, role: r, createdAt: new Date() });
    await tx.update(invitations).set({ acceptedAt: new Date(), acceptedBy: me.id }).where(eq(invitations.id, inv.id));
    await recordAudit(tx, {
      projectId: inv.projectId,
      actorId: me.id,
      action: 'member.joined',
      objectType: 'member',
      objectId: me.id,
      details: { role: r, invitationId: inv.id },
    });
  });
  return { membership: { projectId: inv.projectId, role: r } };
});
