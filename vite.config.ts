import { defineConfig } from "vite";
import react from "@vitejs/plugin-react";
import tailwindcss from "@tailwindcss/vite";
import { compression } from "vite-plugin-compression2";
import { fileURLToPath } from "node:url";

// In `npm run dev` the API server listens on API_PORT and Vite proxies /api to it.
const apiPort = Number(process.env.API_PORT ?? 5181);

export default defineConfig({
  // Brotli and gzip copies of every text asset sit beside it in dist/; the server sends the one the
  // browser accepts (server/http/clientAssets.ts).
  plugins: [react(), tailwindcss(), compression({ algorithms: ["brotliCompress", "gzip"] })],
  resolve: {
    alias: {
      "@shared": fileURLToPath(new URL("./shared", import.meta.url)),
    },
  },
  server: {
    host: "127.0.0.1",
    port: Number(process.env.VITE_PORT ?? 5173),
    proxy: { "/api": { target: `http://127.0.0.1:${apiPort}`, changeOrigin: false } },
  },
  build: {
    outDir: "dist",
    emptyOutDir: true,
    chunkSizeWarningLimit: 500,
    rolldownOptions: {
      output: {
        // Screens are split by the router (src/app/router.tsx); the big libraries get chunks of their
        // own so that a screen without charts or the grid never fetches them, and a new release of
        // one screen leaves the others cached.
        codeSplitting: {
          groups: [
            // First: the charts and the grid depend on React and would otherwise take it in.
            { name: "react", priority: 3, test: /node_modules[\\/](react|react-dom|scheduler|react-router|react-router-dom|@tanstack[\\/](react-query|query-core))[\\/]/ },
            { name: "charts", priority: 2, test: /node_modules[\\/](@nivo|d3-|@react-spring|internmap|lodash)/ },
            { name: "grid", priority: 1, test: /node_modules[\\/]@tanstack[\\/](react-table|table-core|react-virtual|virtual-core)/ },
          ],
        },
      },
    },
  },
});
