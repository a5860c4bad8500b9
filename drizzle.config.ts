import { defineConfig } from 'drizzle-kit';

// Migrations are generated with `npx drizzle-kit generate` and applied at start-up.
export default defineConfig({
  dialect: 'sqlite',
  schema: './src/lib/db/schema.ts',
  out: './drizzle',
});
