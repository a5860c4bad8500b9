/**
 * better-auth: e-mail and password accounts, e-mail verification and password
 * reset, with mail through src/lib/mail.ts. Built lazily so tests can point
 * DATABASE_URL somewhere else first.
 */
import { betterAuth } from 'better-auth';
import { drizzleAdapter } from 'better-auth/adapters/drizzle';
import { getDb, schema, type Db } from './db';
import { authSecret, publicOrigin, trustedOrigins } from './env';
import { sendMail } from './mail';

export const CLIENT_IP_HEADER = 'x-skiplane-client-ip';

function build(db: Db) {
  return betterAuth({
    appName: 'Skiplane',
    baseURL: publicOrigin(),
    basePath: '/api/auth',
    secret: authSecret(),
    // The configured origins, plus the request's own origin: Astro builds request.url only from
    // a Host it trusts (security.allowedDomains), so this admits same-origin calls on any port.
    trustedOrigins: (request) => [...trustedOrigins(), request ? new URL(request.url).origin : null],
    database: drizzleAdapter(db, {
      provider: 'sqlite',
      schema: { user: schema.user, session: schema.session, account: schema.account, verification: schema.verification },
    }),
    emailAndPassword: {
      enabled: true,
      minPasswordLength: 8,
      maxPasswordLength: 128,
      autoSignIn: true,
      // Unverified accounts may sign in; the layout asks them to verify.
      requireEmailVerification: false,
      revokeSessionsOnPasswordReset: true,
      sendResetPassword: async ({ user, url }) => {
        await sendMail({
          to: user.email,
          subject: 'Reset your Skiplane password',
          text: `Hello ${user.name},\n\nSomeone asked to reset the password of your Skiplane account.\nTo choose a new password, open this link within one hour:\n\n${url}\n\nIf it was not you, ignore this message; your password stays as it is.\n`,
        });
      },
    },
    emailVerification: {
      sendOnSignUp: true,
      autoSignInAfterVerification: true,
      sendVerificationEmail: async ({ user, url }) => {
        await sendMail({
          to: user.email,
          subject: 'Verify your e-mail for Skiplane',
          text: `Hello ${user.name},\n\nPlease confirm that ${user.email} is your address by opening this link within one hour:\n\n${url}\n\nYou can keep using Skiplane meanwhile.\n`,
        });
      },
    },
    session: {
      expiresIn: 60 * 60 * 24 * 14,
      updateAge: 60 * 60 * 24,
    },
    advanced: {
      // Plain http on localhost must still get its cookie.
      useSecureCookies: publicOrigin().startsWith('https:'),
      // better-auth turns the origin check off under test runners; keep it on so tests see production behaviour.
      disableOriginCheck: false,
      // Set by src/pages/api/auth/[...all].ts from the socket address.
      ipAddress: { ipAddressHeaders: [CLIENT_IP_HEADER] },
    },
  });
}

export type Auth = ReturnType<typeof build>;

let instance: Promise<Auth> | null = null;

export function getAuth(): Promise<Auth> {
  instance ??= getDb().then(build);
  return instance;
}

/** Test hook: forget the instance after the database changed. */
export function resetAuth(): void {
  instance = null;
}

export interface SessionUser {
  id: string;
  name: string;
  email: string;
  emailVerified: boolean;
}

export async function getSessionUser(headers: Headers): Promise<SessionUser | null> {
  const auth = await getAuth();
  const s = await auth.api.getSession({ headers });
  if (!s) return null;
  const { id, name, email, emailVerified } = s.user;
  return { id, name, email, emailVerified };
}
