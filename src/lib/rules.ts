/**
 * Input rules shared by the API (src/lib/api) and the browser forms
 * (src/components): one definition each, so a form refuses exactly what the
 * server would, with the same words. Pure zod, safe to bundle for the browser.
 */
import { z } from 'zod';

export const ROLES = ['owner', 'designer', 'reviewer', 'viewer'] as const;
export type Role = (typeof ROLES)[number];
export const NETLIST_KINDS = ['ripple-carry', 'carry-skip', 'other'] as const;
export type NetlistKind = (typeof NETLIST_KINDS)[number];
export const REVISION_FORMATS = ['verilog', 'json'] as const;
export type RevisionFormat = (typeof REVISION_FORMATS)[number];
export const RUN_KINDS = ['equivalence', 'proof', 'slowest-vector', 'sweep'] as const;
export const RUN_STATUSES = ['queued', 'running', 'passed', 'failed', 'error', 'cancelled'] as const;
export const RUN_PLACES = ['browser', 'server'] as const;
export const REVIEW_STATES = ['requested', 'approved', 'rejected', 'withdrawn'] as const;

/** The engine simulates adders of 1 to 128 bits. */
export const MAX_NETLIST_WIDTH = 128;
export const MAX_REVISION_BYTES = 2 * 1024 * 1024;
export const REVISION_SUFFIXES: Record<string, RevisionFormat> = { '.v': 'verilog', '.json': 'json' };
export const PASSWORD_MIN = 8;
export const PASSWORD_MAX = 128;

/**
 * The file name the engine reads a revision's text under: the stored name,
 * or `netlist`, with the suffix of its format added when missing (the
 * format decides the reader, whatever the name ends in). The server check
 * and the browser runs use it, so their messages name the same file.
 */
export function revisionSourceName(format: RevisionFormat, filename: string | null): string {
  const suffix = format === 'verilog' ? '.v' : '.json';
  const name = filename ?? `netlist${suffix}`;
  return name.toLowerCase().endsWith(suffix) ? name : `${name}${suffix}`;
}

const oneOf = (what: string, values: readonly string[]) => `${what} must be one of ${values.join(', ')}`;

export const personName = z.string().trim().min(1, 'Enter a name').max(80, 'Keep the name to 80 characters or fewer');
export const email = z.string().trim().toLowerCase().min(1, 'Enter an e-mail address').pipe(z.email('Give a valid e-mail address, like name@example.com'));
export const password = z.string().min(PASSWORD_MIN, `Use at least ${PASSWORD_MIN} characters`).max(PASSWORD_MAX, `Use at most ${PASSWORD_MAX} characters`);
export const role = z.enum(ROLES, { error: oneOf('Role', ROLES) });

export const projectName = z.string().trim().min(1, 'Give the project a name').max(80, 'Keep the name to 80 characters or fewer');
export const projectDescription = z.string().trim().max(2000, 'Keep the description to 2000 characters or fewer');

export const netlistName = z
  .string()
  .trim()
  .min(1, 'Give the netlist a name')
  .max(64, 'Keep the name to 64 characters or fewer')
  .regex(/^[A-Za-z0-9][A-Za-z0-9_.-]*$/, 'Use letters, digits, "_", "-" and "." only, starting with a letter or digit');
export const netlistDescription = projectDescription;
export const netlistWidth = z
  .number({ error: 'Width must be a number of bits' })
  .int('Width must be a whole number of bits')
  .min(1, 'Width must be at least 1 bit')
  .max(MAX_NETLIST_WIDTH, `Width must be at most ${MAX_NETLIST_WIDTH} bits`);
export const netlistKind = z.enum(NETLIST_KINDS, { error: oneOf('Kind', NETLIST_KINDS) });

export const revisionMessage = z.string().trim().max(500, 'Keep the message to 500 characters or fewer');
export const reviewComment = z.string().trim().max(4000, 'Keep the comment to 4000 characters or fewer');
export const runKind = z.enum(RUN_KINDS, { error: oneOf('Kind', RUN_KINDS) });
export const runPlace = z.enum(RUN_PLACES, { error: 'Place must be "browser" or "server"' });
/** Seeds travel as decimal strings so 64-bit values survive JSON. */
export const seedText = z
  .string()
  .trim()
  .regex(/^\d{1,20}$/, 'The seed must be a whole number of up to 20 digits');

// Request bodies.
export const createProjectBody = z.object({ name: projectName, description: projectDescription.default('') }).strict();
export const updateProjectBody = z
  .object({ name: projectName.optional(), description: projectDescription.optional() })
  .strict()
  .refine((b) => b.name !== undefined || b.description !== undefined, 'Send a new name or description');
export const inviteBody = z.object({ email, role }).strict();
export const changeRoleBody = z.object({ role }).strict();
export const createNetlistBody = z.object({ name: netlistName, description: netlistDescription.default(''), width: netlistWidth, kind: netlistKind }).strict();
export const updateNetlistBody = z
  .object({ name: netlistName.optional(), description: netlistDescription.optional(), width: netlistWidth.optional(), kind: netlistKind.optional() })
  .strict()
  .refine((b) => Object.values(b).some((v) => v !== undefined), 'Send at least one field to change');
export const decideReviewBody = z
  .object({
    state: z.enum(['approved', 'rejected', 'withdrawn'], { error: 'State must be approved, rejected or withdrawn' }),
    comment: reviewComment.default(''),
  })
  .strict()
  .refine((b) => b.state !== 'rejected' || b.comment.length > 0, { message: 'Say why when you reject', path: ['comment'] });
