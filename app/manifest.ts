import type { MetadataRoute } from "next";

// The web app manifest: a technician pins Halftrip to the home screen and opens it full-screen on the
// overview. Icons are our own mark, drawn by scripts/build-icons.mjs.
export default function manifest(): MetadataRoute.Manifest {
  return {
    name: "Halftrip",
    short_name: "Halftrip",
    description: "Levels, volumes and occupancy from ultrasonic sensors in the field.",
    start_url: "/",
    scope: "/",
    display: "standalone",
    background_color: "#f6f5f1",
    theme_color: "#1f2a30",
    icons: [
      { src: "/icons/icon-192.png", sizes: "192x192", type: "image/png", purpose: "any" },
      { src: "/icons/icon-512.png", sizes: "512x512", type: "image/png", purpose: "any" },
      { src: "/icons/maskable-512.png", sizes: "512x512", type: "image/png", purpose: "maskable" },
      { src: "/favicon.svg", sizes: "any", type: "image/svg+xml", purpose: "any" },
    ],
  };
}
