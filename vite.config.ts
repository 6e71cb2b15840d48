import { defineConfig } from "vite";
import react from "@vitejs/plugin-react";
import tailwindcss from "@tailwindcss/vite";

const apiPort = Number(process.env.PORT ?? 5180);

export default defineConfig({
  plugins: [react(), tailwindcss()],
  build: { outDir: "dist", chunkSizeWarningLimit: 600 },
  server: {
    proxy: {
      "/api": `http://127.0.0.1:${apiPort}`,
      "/socket.io": { target: `http://127.0.0.1:${apiPort}`, ws: true },
    },
  },
});
