import { defineConfig } from 'vite';
import react from '@vitejs/plugin-react';
import tailwindcss from '@tailwindcss/vite';

// The client is built into dist/client; in production the Express server serves it.
// In development Vite proxies /api to the server started by `tsx watch`.
export default defineConfig({
  plugins: [react(), tailwindcss()],
  // Each screen is its own chunk (lazy routes in src/app/router.tsx); `npm run bench` checks the budgets
  // of the first screens (scripts/bundle-budget.ts). Plot and statistics load only with the screens that use them.
  build: {
    outDir: 'dist/client',
    emptyOutDir: true,
    // 'hidden': maps are written for debugging on the server's disk, no bundle points to them, and the
    // server refuses to serve them (server/app.ts).
    sourcemap: 'hidden',
    chunkSizeWarningLimit: 500,
  },
  server: {
    port: 5173,
    proxy: { '/api': { target: `http://localhost:${process.env.PORT ?? 3000}`, changeOrigin: false } },
  },
});
