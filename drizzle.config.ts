import { defineConfig } from 'drizzle-kit'

// Used only by `npm run db:generate`, which needs no running database.
export default defineConfig({
  dialect: 'postgresql',
  schema: './server/db/schema.ts',
  out: './drizzle',
  casing: 'snake_case',
  strict: true,
  verbose: true,
})
