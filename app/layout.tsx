import type { Metadata, Viewport } from "next";
import { plexMono, plexSans, plexSerif } from "./fonts";
import "./globals.css";

export const metadata: Metadata = {
  title: { default: "Delta Ledger", template: "%s · Delta Ledger" },
  description: "Plan a funded study's sample size and its recruitment budget together.",
  // app/icon.svg is the browser tab's icon; the others come from public/ (made from it). Naming `icons`
  // here replaces the link Next would add for app/icon.svg, so it is named too: without it every first
  // page asked for /favicon.ico, which is a 404 (a console error in the browser tests).
  icons: { icon: [{ url: "/icon.svg", type: "image/svg+xml" }, { url: "/icon-192.png", type: "image/png", sizes: "192x192" }], apple: "/apple-touch-icon.png" },
  manifest: "/manifest.webmanifest",
  robots: { index: false, follow: false },
};

export const viewport: Viewport = { width: "device-width", initialScale: 1 };

export default function RootLayout({ children }: { children: React.ReactNode }) {
  return (
    <html lang="en" className={`${plexSans.variable} ${plexSerif.variable} ${plexMono.variable}`}>
      <body className="min-h-screen antialiased">{children}</body>
    </html>
  );
}
