/** Direct database access for tests that set up what no API route creates. */
import { getDb } from '../../../src/lib/db';
export { memberships } from '../../../src/lib/db/schema';
export const db = getDb;
