import { defineConfig } from 'drizzle-kit';

// `npm run db:generate` turns changes under schema/ into a new SQL migration in schema/migrations;
// review and commit it. The server applies pending migrations at start (server/db/migrate.ts).
export default defineConfig({
  dialect: 'postgresql',
  schema: './schema',
  out: './schema/migrations',
  strict: true,
  verbose: true,
});
