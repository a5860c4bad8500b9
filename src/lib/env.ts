/**
 * Everything the server reads from the environment, in one place, read
 * lazily so tests can set variables before first use.
 */
import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';

export function databaseUrl(): string {
  return process.env.DATABASE_URL?.trim() || 'file:./data/skiplane.db';
}

export function databaseAuthToken(): string | undefined {
  return process.env.DATABASE_AUTH_TOKEN?.trim() || undefined;
}

export function dataDir(): string {
  return path.resolve(process.env.DATA_DIR?.trim() || './data');
}

export function outboxDir(): string {
  return path.resolve(process.env.OUTBOX_DIR?.trim() || path.join(dataDir(), 'outbox'));
}

export function smtpUrl(): string | undefined {
  return process.env.SMTP_URL?.trim() || undefined;
}

export function mailFrom(): string {
  return process.env.MAIL_FROM?.trim() || 'Skiplane <no-reply@skiplane.localhost>';
}

export function port(): number {
  const p = Number(process.env.PORT ?? 4321);
  return Number.isInteger(p) && p > 0 && p < 65536 ? p : 4321;
}

export function host(): string {
  return process.env.HOST?.trim() || 'localhost';
}

/** The origin users reach the app at: PUBLIC_ORIGIN, else built from HOST and PORT. */
export function publicOrigin(): string {
  const explicit = process.env.PUBLIC_ORIGIN?.trim();
  if (explicit) return new URL(explicit).origin;
  const h = host();
  const name = h === '0.0.0.0' || h === '::' ? 'localhost' : h;
  return `http://${name}:${port()}`;
}

/** Origins better-auth accepts: the public one plus the loopback names on our port. */
export function trustedOrigins(): string[] {
  const p = port();
  const set = new Set([publicOrigin(), `http://localhost:${p}`, `http://127.0.0.1:${p}`]);
  const h = host();
  if (h !== '0.0.0.0' && h !== '::') set.add(`http://${h}:${p}`);
  return [...set];
}

/**
 * better-auth's signing secret: BETTER_AUTH_SECRET if set, else a random one
 * made once and kept in data/auth-secret, so sessions survive restarts.
 */
export function authSecret(): string {
  const s = process.env.BETTER_AUTH_SECRET?.trim();
  if (s) return s;
  const file = path.join(dataDir(), 'auth-secret');
  try {
    const kept = fs.readFileSync(file, 'utf8').trim();
    if (kept.length >= 32) return kept;
  } catch {
    // not made yet
  }
  fs.mkdirSync(dataDir(), { recursive: true });
  const made = crypto.randomBytes(32).toString('hex');
  fs.writeFileSync(file, made + '\n', { mode: 0o600 });
  return made;
}
