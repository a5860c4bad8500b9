/** Applies migrations and seeds an empty database with the demo project (run by scripts/start.mjs). */
import { closeDb, getDb } from '../src/lib/db';
import { databaseUrl } from '../src/lib/env';
import { seedDemo } from '../src/lib/seed';

const db = await getDb();
const r = await seedDemo(db);
console.log(r.seeded ? `[skiplane] seeded the demo project into ${databaseUrl()}` : `[skiplane] database ${databaseUrl()} ready (already has users; not seeded)`);
await closeDb();
