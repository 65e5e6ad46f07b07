import { defineConfig } from 'drizzle-kit';

export default defineConfig({
  dialect: 'postgresql',
  schema: ['./src/schema.ts', './src/projection-schema.ts', './src/comments-schema.ts', './src/deid-schema.ts', './src/supervision-schema.ts'],
  out: './migrations',
});
