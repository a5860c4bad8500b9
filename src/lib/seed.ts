/**
 * Demo data for an empty database: the fictional "Heron Bay sensor hub"
 * team, three accounts and a few placeholder adders (one revision each).
 * A later issue swaps the placeholders for engine-generated adders; add them
 * to DEMO_NETLISTS.
 */
import crypto from 'node:crypto';
import { hashPassword } from 'better-auth/crypto';
import { sql } from 'drizzle-orm';
import type { Db } from './db';
import { account, memberships, netlists, projects, revisions, user, type NetlistKind, type Role } from './db/schema';
import { recordAudit } from './api/audit';
import { sha256 } from './api/revisions';

export const DEMO_PASSWORD = 'skiplane-demo';

export const DEMO_USERS: { name: string; email: string; role: Role }[] = [
  { name: 'Oona Marsh (demo owner)', email: 'owner@heronbay.test', role: 'owner' },
  { name: 'Dario Quill (demo designer)', email: 'designer@heronbay.test', role: 'designer' },
  { name: 'Rhea Tamsin (demo reviewer)', email: 'reviewer@heronbay.test', role: 'reviewer' },
];

/** A ripple-carry adder written as Verilog continuous assignments (no delays: the delay table applies). */
function rippleVerilog(name: string, n: number): string {
  const lines = [
    `// ${n}-bit ripple-carry adder, placeholder for the Heron Bay demo.`,
    `module ${name} (input [${n - 1}:0] a, input [${n - 1}:0] b, input cin, output [${n - 1}:0] s, output cout);`,
    `  wire [${n}:0] c;`,
    `  assign c[0] = cin;`,
  ];
  for (let i = 0; i < n; i++) {
    lines.push(`  assign s[${i}] = a[${i}] ^ b[${i}] ^ c[${i}];`);
    lines.push(`  assign c[${i + 1}] = (a[${i}] & b[${i}]) | (c[${i}] & (a[${i}] ^ b[${i}]));`);
  }
  lines.push(`  assign cout = c[${n}];`, 'endmodule', '');
  return lines.join('\n');
}

/** A carry-skip adder: blocks of `m` bits ripple, and a block whose bits all propagate passes its carry-in on. */
function skipVerilog(name: string, n: number, m: number): string {
  const lines = [
    `// ${n}-bit carry-skip adder in blocks of ${m} bits, placeholder for the Heron Bay demo.`,
    `module ${name} (input [${n - 1}:0] a, input [${n - 1}:0] b, input cin, output [${n - 1}:0] s, output cout);`,
    `  wire [${n}:0] c;`,
    `  wire [${n - 1}:0] p;`,
    `  assign c[0] = cin;`,
    `  assign p = a ^ b;`,
  ];
  for (let lo = 0; lo < n; lo += m) {
    const hi = Math.min(lo + m, n) - 1;
    lines.push(`  // block bits ${hi}..${lo}`);
    lines.push(`  wire [${hi + 1}:${lo + 1}] r${lo};`);
    for (let i = lo; i <= hi; i++) {
      const cin = i === lo ? `c[${lo}]` : `r${lo}[${i}]`;
      lines.push(`  assign s[${i}] = p[${i}] ^ ${cin};`);
      lines.push(`  assign r${lo}[${i + 1}] = (a[${i}] & b[${i}]) | (${cin} & p[${i}]);`);
    }
    const bp = Array.from({ length: hi - lo + 1 }, (_, k) => `p[${lo + k}]`).join(' & ');
    lines.push(`  assign c[${hi + 1}] = (${bp}) ? c[${lo}] : r${lo}[${hi + 1}];`);
  }
  lines.push(`  assign cout = c[${n}];`, 'endmodule', '');
  return lines.join('\n');
}

export const DEMO_NETLISTS: { name: string; description: string; width: number; kind: NetlistKind; filename: string; content: () => string }[] = [
  {
    name: 'acc-ripple-8',
    description: 'Accumulator adder, straightforward ripple-carry baseline.',
    width: 8,
    kind: 'ripple-carry',
    filename: 'acc_ripple8.v',
    content: () => rippleVerilog('acc_ripple8', 8),
  },
  {
    name: 'acc-skip-8',
    description: 'Accumulator adder with carry bypass every 4 bits.',
    width: 8,
    kind: 'carry-skip',
    filename: 'acc_skip8.v',
    content: () => skipVerilog('acc_skip8', 8, 4),
  },
  {
    name: 'tick-ripple-4',
    description: 'Tick counter increment stage.',
    width: 4,
    kind: 'ripple-carry',
    filename: 'tick_ripple4.v',
    content: () => rippleVerilog('tick_ripple4', 4),
  },
];

export interface SeedResult {
  seeded: boolean;
  projectId?: string;
}

/** Seeds only a database without users, so it never touches real data. */
export async function seedDemo(db: Db): Promise<SeedResult> {
  const existing = await db
    .select({ n: sql<number>`count(*)` })
    .from(user)
    .get();
  if ((existing?.n ?? 0) > 0) return { seeded: false };

  const now = new Date();
  const hash = await hashPassword(DEMO_PASSWORD);
  const ids = DEMO_USERS.map(() => crypto.randomUUID());
  const projectId = crypto.randomUUID();
  const ownerId = ids[0];
  const designerId = ids[1];

  await db.transaction(async (tx) => {
    for (const [i, u] of DEMO_USERS.entries()) {
      await tx.insert(user).values({ id: ids[i], name: u.name, email: u.email, emailVerified: true, createdAt: now, updatedAt: now });
      await tx
        .insert(account)
        .values({ id: crypto.randomUUID(), accountId: ids[i], providerId: 'credential', userId: ids[i], password: hash, createdAt: now, updatedAt: now });
    }
    await tx.insert(projects).values({
      id: projectId,
      name: 'Heron Bay sensor hub',
      description: 'Adders for the accumulator and tick counter of a fictional low-power sensor hub. Demo data.',
      createdBy: ownerId,
      createdAt: now,
      updatedAt: now,
    });
    await recordAudit(tx, {
      projectId,
      actorId: ownerId,
      action: 'project.created',
      objectType: 'project',
      objectId: projectId,
      details: { name: 'Heron Bay sensor hub' },
    });
    for (const [i, u] of DEMO_USERS.entries()) {
      await tx.insert(memberships).values({ projectId, userId: ids[i], role: u.role, createdAt: now });
      if (i > 0)
        await recordAudit(tx, { projectId, actorId: ids[i], action: 'member.joined', objectType: 'member', objectId: ids[i], details: { role: u.role } });
    }
    for (const n of DEMO_NETLISTS) {
      const netlistId = crypto.randomUUID();
      const content = n.content();
      const revisionId = crypto.randomUUID();
      await tx.insert(netlists).values({
        id: netlistId,
        projectId,
        name: n.name,
        description: n.description,
        width: n.width,
        kind: n.kind,
        createdBy: designerId,
        createdAt: now,
        updatedAt: now,
      });
      await recordAudit(tx, {
        projectId,
        actorId: designerId,
        action: 'netlist.created',
        objectType: 'netlist',
        objectId: netlistId,
        details: { name: n.name, width: n.width, kind: n.kind },
      });
      await tx.insert(revisions).values({
        id: revisionId,
        netlistId,
        number: 1,
        format: 'verilog',
        filename: n.filename,
        message: 'Placeholder from the demo seed.',
        content,
        contentHash: sha256(content),
        sizeBytes: Buffer.byteLength(content, 'utf8'),
        authorId: designerId,
        createdAt: now,
      });
      await recordAudit(tx, {
        projectId,
        actorId: designerId,
        action: 'revision.created',
        objectType: 'revision',
        objectId: revisionId,
        details: { netlistId, netlist: n.name, number: 1, contentHash: sha256(content), format: 'verilog' },
      });
    }
  });
  return { seeded: true, projectId };
}
