import { defineConfig } from "vite";
import react from "@vitejs/plugin-react";
import tailwindcss from "@tailwindcss/vite";

const apiTarget = process.env.STACKPROOF_API_URL ?? "http://127.0.0.1:5317";

export default defineConfig({
  plugins: [react(), tailwindcss()],
  server: { port: 5173, proxy: { "/api": { target: apiTarget, changeOrigin: false } } },
  worker: { format: "es" },
  build: { sourcemap: false, chunkSizeWarningLimit: 1500 },
});
