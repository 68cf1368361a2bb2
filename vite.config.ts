import { defineConfig } from 'vite';
import react from '@vitejs/plugin-react';
import tailwindcss from '@tailwindcss/vite';

// The client is built into dist/client; in production the Express server serves it.
// In development Vite proxies /api to the server started by `tsx watch`.
export default defineConfig({
  plugins: [react(), tailwindcss()],
  // Plot and the table library are large; one chunk under 1 MB is fine for a shop's local server.
  build: { outDir: 'dist/client', emptyOutDir: true, sourcemap: true, chunkSizeWarningLimit: 1000 },
  server: {
    port: 5173,
    proxy: { '/api': { target: `http://localhost:${process.env.PORT ?? 3000}`, changeOrigin: false } },
  },
});
