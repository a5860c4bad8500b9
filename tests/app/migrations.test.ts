/** The committed migrations in drizzle/ describe the schema exactly: no change is waiting for `drizzle-kit generate`. */
import fs from 'node:fs';
import path from 'node:path';
import { generateSQLiteDrizzleJson, generateSQLiteMigration } from 'drizzle-kit/api';
import { describe, expect, it } from 'vitest';
import * as schema from '../../src/lib/db/schema';

describe('migrations', () => {
  it('match src/lib/db/schema.ts', async () => {
    const meta = path.resolve('drizzle/meta');
    const last = fs
      .readdirSync(meta)
      .filter((f) => f.endsWith('_snapshot.json'))
      .sort()
      .at(-1)!;
    const previous = JSON.parse(fs.readFileSync(path.join(meta, last), 'utf8'));
    const current = await generateSQLiteDrizzleJson(schema as unknown as Record<string, unknown>, previous.id);
    const pending = await generateSQLiteMigration(previous, current);
    expect(pending, 'run `npx drizzle-kit generate` and commit drizzle/').toEqual([]);
  });
});
