import localFont from "next/font/local";

// Shipped with the app (public/fonts, SIL Open Font License); next/font/google would download at build time.
export const sans = localFont({
  src: [
    { path: "../public/fonts/atkinson-hyperlegible-latin-400-normal.woff2", weight: "400" },
    { path: "../public/fonts/atkinson-hyperlegible-latin-700-normal.woff2", weight: "700" },
  ],
  variable: "--font-sans",
  display: "swap",
});

export const mono = localFont({
  src: [
    { path: "../public/fonts/ibm-plex-mono-latin-400-normal.woff2", weight: "400" },
    { path: "../public/fonts/ibm-plex-mono-latin-600-normal.woff2", weight: "600" },
  ],
  variable: "--font-mono",
  display: "swap",
});
