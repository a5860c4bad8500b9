/**
 * One libSQL client and Drizzle handle per process. Migrations from drizzle/
 * are applied once, on first use, so every entry point (server, seed script,
 * tests) sees the current schema.
 */
import fs from 'node:fs';
import path from 'node:path';
import { createClient, type Client } from '@libsql/client';
import { drizzle, type LibSQLDatabase } from 'drizzle-orm/libsql';
import { migrate } from 'drizzle-orm/libsql/migrator';
import { databaseAuthToken, databaseUrl } from '../env';
import * as schema from './schema';

export type Db = LibSQLDatabase<typeof schema>;

let state: { client: Client; db: Db; ready: Promise<void> } | null = null;

/** libSQL does not create the folder of a file: database, so we do. */
function ensureFileDir(url: string): void {
  if (!url.startsWith('file:')) return;
  const file = url.slice('file:'.length).split('?')[0];
  if (!file || file === ':memory:') return;
  fs.mkdirSync(path.dirname(path.resolve(file)), { recursive: true });
}

export function migrationsFolder(): string {
  return path.resolve(process.env.MIGRATIONS_DIR ?? './drizzle');
}

function open() {
  const url = databaseUrl();
  ensureFileDir(url);
  const client = createClient({ url, authToken: databaseAuthToken() });
  const db = drizzle(client, { schema });
  const ready = (async () => {
    if (url.startsWith('file:')) {
      // Wait rather than fail when two processes touch the file at once; enforce foreign keys.
      await client.execute('PRAGMA busy_timeout = 5000');
      await client.execute('PRAGMA foreign_keys = ON');
      await client.execute('PRAGMA journal_mode = WAL');
    }
    await migrate(db, { migrationsFolder: migrationsFolder() });
  })();
  return { client, db, ready };
}

/** The database, migrated. */
export async function getDb(): Promise<Db> {
  state ??= open();
  await state.ready;
  return state.db;
}

/** Closes the client (tests and scripts); the next getDb() opens a fresh one. */
export async function closeDb(): Promise<void> {
  if (!state) return;
  const s = state;
  state = null;
  await s.ready.catch(() => undefined);
  s.client.close();
}

export { schema };
