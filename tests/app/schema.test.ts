/** Our hand-written auth tables must hold every field better-auth expects (its CLI cannot run on Node 20). */
import { getAuthTables } from 'better-auth/db';
import { getTableColumns } from 'drizzle-orm';
import { describe, expect, it } from 'vitest';
import * as schema from '../../src/lib/db/schema';

const tables = { user: schema.user, session: schema.session, account: schema.account, verification: schema.verification };

describe('better-auth tables', () => {
  const expected = getAuthTables({ emailAndPassword: { enabled: true }, emailVerification: {} });
  it.each(Object.keys(tables) as (keyof typeof tables)[])('%s has every field, with the right nullability', (name) => {
    const cols = getTableColumns(tables[name]);
    const model = expected[name];
    expect(model, `better-auth knows a ${name} table`).toBeTruthy();
    expect(cols.id, `${name}.id`).toBeTruthy();
    for (const [field, def] of Object.entries(model.fields)) {
      const col = cols[(def.fieldName ?? field) as keyof typeof cols] as { notNull: boolean; dataType: string } | undefined;
      expect(col, `${name}.${field}`).toBeTruthy();
      expect(col!.notNull, `${name}.${field} not null`).toBe(def.required !== false);
      const want = def.type === 'date' ? 'date' : def.type === 'boolean' ? 'boolean' : def.type === 'number' ? 'number' : 'string';
      expect(col!.dataType, `${name}.${field} type`).toBe(want);
    }
  });

  it('has no table better-auth does not know about among the auth ones', () => {
    expect(Object.keys(expected).sort()).toEqual(Object.keys(tables).sort());
  });
});
