import react from "@vitejs/plugin-react";
import tailwindcss from "@tailwindcss/vite";
import { defineConfig } from "vite";
import { compression } from "vite-plugin-compression2";

export default defineConfig({
  plugins: [
    react(),
    tailwindcss(),
    // A gzip and a brotli copy of every text file over 1 KiB, made once at build time; the server sends the one a
    // browser accepts (express-static-gzip), so nothing is compressed per request.
    compression({ algorithms: ["gzip", "brotliCompress"], include: /\.(js|css|html|svg|json)$/, threshold: 1024, skipIfLargerOrEqual: true }),
  ],
  server: {
    port: 5173,
    // The dev server forwards API calls to the Express server started by `npm run dev`.
    proxy: { "/api": { target: "http://localhost:4173", changeOrigin: false } },
  },
  // The manifest lets `bench/web.ts` add up what each page loads (its entry chunk and their static imports).
  build: { chunkSizeWarningLimit: 2000, manifest: true },
});
