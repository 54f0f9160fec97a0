import type { Metadata, Viewport } from "next";
import { cookies } from "next/headers";
import type { ReactNode } from "react";
import { mono, sans } from "@/components/fonts";
import { Providers } from "@/components/providers";
import "./globals.css";

export const metadata: Metadata = {
  title: { default: "Nightmark", template: "%s · Nightmark" },
  description: "Night-sky brightness measured by a volunteer network: sites, stations, trends and evidence.",
};

export const viewport: Viewport = { width: "device-width", initialScale: 1, themeColor: "#0b0e17" };

export default async function RootLayout({ children }: { children: ReactNode }) {
  const theme = (await cookies()).get("nm-theme")?.value === "night" ? "night" : "dark";
  return (
    <html lang="en" data-theme={theme} className={`${sans.variable} ${mono.variable}`}>
      <body className="min-h-screen font-sans antialiased">
        <a href="#main" className="sr-only focus:not-sr-only focus:absolute focus:left-2 focus:top-2 focus:z-50 focus:rounded focus:bg-accent focus:p-2 focus:text-accent-fg">
          Skip to content
        </a>
        <Providers>{children}</Providers>
      </body>
    </html>
  );
}
