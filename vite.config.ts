import { defineConfig } from 'vite';
import react from '@vitejs/plugin-react';
import tailwindcss from '@tailwindcss/vite';

const apiPort = process.env.PORT ?? '3210';

export default defineConfig({
  plugins: [react(), tailwindcss()],
  server: { proxy: { '/api': `http://127.0.0.1:${apiPort}` } },
  build: {
    outDir: 'dist/client',
    emptyOutDir: true,
    chunkSizeWarningLimit: 1500,
  },
});
