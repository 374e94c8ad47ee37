import type { Metadata, Viewport } from "next";
import "./globals.css";
import { figureFont, textFont } from "./fonts";

export const metadata: Metadata = {
  title: { default: "Halftrip", template: "%s · Halftrip" },
  description: "Levels, volumes and occupancy from ultrasonic sensors in the field.",
  icons: { icon: "/favicon.svg", apple: "/icons/apple-touch-icon.png" },
  appleWebApp: { capable: true, title: "Halftrip", statusBarStyle: "default" },
};

// Pages carry a per-request script nonce (proxy.ts), so none may be prerendered without it.
export const dynamic = "force-dynamic";

export const viewport: Viewport = { width: "device-width", initialScale: 1, themeColor: "#1f2a30" };

export default function RootLayout({ children }: { children: React.ReactNode }) {
  return (
    <html lang="en" className={`${textFont.variable} ${figureFont.variable}`}>
      <body className="min-h-screen">{children}</body>
    </html>
  );
}
