/**
 * Who may do what. Permissions are granted per role; every resource belongs
 * to exactly one project, and the caller's role there decides.
 */
import { and, eq } from 'drizzle-orm';
import type { Db } from '../db';
import { memberships, netlists, projects, reviews, revisions, runs, type Role } from '../db/schema';
import { ApiError, fail } from './errors';

export type Permission = 'read' | 'edit' | 'review' | 'manage';

export const GRANTS: Record<Role, readonly Permission[]> = {
  owner: ['read', 'edit', 'review', 'manage'],
  designer: ['read', 'edit'],
  reviewer: ['read', 'review'],
  viewer: ['read'],
};

const PERMISSION_WORDS: Record<Permission, string> = {
  read: 'read this project',
  edit: 'edit netlists or start runs (designers and owners can)',
  review: 'review revisions (reviewers and owners can)',
  manage: 'manage the project and its members (owners can)',
};

export function can(role: Role | null, need: Permission): boolean {
  return role !== null && GRANTS[role].includes(need);
}

export type ScopeType = 'project' | 'netlist' | 'revision' | 'run' | 'review';

export interface Scope {
  type: ScopeType | 'none';
  projectId: string | null;
  role: Role | null;
}

async function projectOf(db: Db, type: ScopeType, id: string): Promise<string | null> {
  switch (type) {
    case 'project': {
      const r = await db.select({ id: projects.id }).from(projects).where(eq(projects.id, id)).get();
      return r?.id ?? null;
    }
    case 'netlist': {
      const r = await db.select({ p: netlists.projectId }).from(netlists).where(eq(netlists.id, id)).get();
      return r?.p ?? null;
    }
    case 'revision': {
      const r = await db
        .select({ p: netlists.projectId })
        .from(revisions)
        .innerJoin(netlists, eq(netlists.id, revisions.netlistId))
        .where(eq(revisions.id, id))
        .get();
      return r?.p ?? null;
    }
    case 'run': {
      const r = await db
        .select({ p: netlists.projectId })
        .from(runs)
        .innerJoin(revisions, eq(revisions.id, runs.revisionId))
        .innerJoin(netlists, eq(netlists.id, revisions.netlistId))
        .where(eq(runs.id, id))
        .get();
      return r?.p ?? null;
    }
    case 'review': {
      const r = await db
        .select({ p: netlists.projectId })
        .from(reviews)
        .innerJoin(revisions, eq(revisions.id, reviews.revisionId))
        .innerJoin(netlists, eq(netlists.id, revisions.netlistId))
        .where(eq(reviews.id, id))
        .get();
      return r?.p ?? null;
    }
  }
}

export async function roleIn(db: Db, projectId: string, userId: string): Promise<Role | null> {
  const m = await db
    .select({ role: memberships.role })
    .from(memberships)
    .where(and(eq(memberships.projectId, projectId), eq(memberships.userId, userId)))
    .get();
  return m?.role ?? null;
}

/** 404 when the resource does not exist, 403 when the caller may not do this to it. */
export async function resolveScope(db: Db, type: ScopeType, id: string, userId: string, need: Permission): Promise<Scope> {
  const projectId = await projectOf(db, type, id);
  if (!projectId) throw fail.notFound(type, id);
  const role = await roleIn(db, projectId, userId);
  if (!role) throw fail.forbidden('You are not a member of this project; ask its owner for an invitation.');
  if (!can(role, need)) throw new ApiError(403, 'forbidden', `Your role here is ${role}; it may not ${PERMISSION_WORDS[need]}.`);
  return { type, projectId, role };
}
