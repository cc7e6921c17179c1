/**
 * Vite builds the map page from TypeScript in web/ into web/dist/, which the server serves at /.
 * Every asset (Leaflet's CSS and images, the drawing plugin's CSS, the preview worker) is emitted as a
 * file of our own: nothing is fetched from another origin, and nothing is inlined as a data: URL
 * (the server's content security policy need not allow them).
 */
import { fileURLToPath } from 'node:url';
import { defineConfig } from 'vite';

const webRoot = fileURLToPath(new URL('.', import.meta.url));

export default defineConfig({
  root: webRoot,
  base: './',
  build: {
    outDir: 'dist',
    emptyOutDir: true,
    assetsInlineLimit: 0,
    sourcemap: true,
    // One page, one worker: a chunk-size warning would only be noise for Leaflet plus zod.
    chunkSizeWarningLimit: 2000,
  },
  worker: { format: 'es' },
  server: { fs: { allow: ['..'] } },
});
