import { defineConfig } from 'vite';
import solid from 'vite-plugin-solid';

// In dev, API and sync go to a running Gloss server (GLOSS_SERVER, default http://127.0.0.1:8080).
const server = process.env.GLOSS_SERVER ?? 'http://127.0.0.1:8080';

export default defineConfig({
  plugins: [solid()],
  build: { outDir: 'dist', target: 'es2022', sourcemap: true },
  server: {
    proxy: {
      '/api': server,
      '/sync': { target: server.replace(/^http/, 'ws'), ws: true },
    },
  },
});
