import { defineConfig } from 'drizzle-kit';

// Migrations are generated from the feature schemas and committed; they are applied at start.
// Never run `drizzle-kit push` against data/.
export default defineConfig({
  dialect: 'sqlite',
  schema: './server/db/schema/*.ts',
  out: './drizzle',
  dbCredentials: { url: process.env.DATABASE_FILE ?? './data/lumenbook.db' },
});
