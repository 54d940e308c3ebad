import react from "@vitejs/plugin-react";
import tailwindcss from "@tailwindcss/vite";
import { defineConfig } from "vite";

export default defineConfig({
  plugins: [react(), tailwindcss()],
  server: {
    port: 5173,
    // The dev server forwards API calls to the Express server started by `npm run dev`.
    proxy: { "/api": { target: "http://localhost:4173", changeOrigin: false } },
  },
  // The manifest lets `bench/web.ts` add up what each page loads (its entry chunk and their static imports).
  build: { chunkSizeWarningLimit: 2000, manifest: true },
});
