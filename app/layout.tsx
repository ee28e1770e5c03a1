import type { Metadata } from "next";
import { headers } from "next/headers";
import localFont from "next/font/local";
import "./globals.css";

const manrope = localFont({ src: "./fonts/manrope.woff2", variable: "--font-manrope", weight: "200 800", display: "swap" });
const fraunces = localFont({ src: "./fonts/fraunces.woff2", variable: "--font-fraunces", weight: "100 900", display: "swap" });
const jetbrains = localFont({ src: "./fonts/jetbrains-mono.woff2", variable: "--font-jetbrains", weight: "100 800", display: "swap" });

const ZOD_JITLESS = "globalThis.__zod_globalConfig=Object.assign(globalThis.__zod_globalConfig||{},{jitless:true});";

export const metadata: Metadata = {
  title: { default: "Hearth", template: "%s · Hearth" },
  description: "Plans print, wash, sinter and finishing for a bound-metal additive-manufacturing shop.",
};

export default async function RootLayout({ children }: { children: React.ReactNode }) {
  // Every page is rendered per request: proxy.ts gives each response a fresh CSP nonce, and
  // Next.js can put it on its scripts only while rendering (a page built ahead has no request).
  const nonce = (await headers()).get("x-nonce") ?? undefined;
  return (
    <html lang="en" className={`${manrope.variable} ${fraunces.variable} ${jetbrains.variable}`}>
      <head>
        {/* Before any bundle: zod 4 probes for eval with new Function("") the first time it builds
            an object schema, which the policy refuses and reports as a violation. jitless skips
            the probe (zod reads globalThis.__zod_globalConfig when it loads). */}
        <script nonce={nonce} dangerouslySetInnerHTML={{ __html: ZOD_JITLESS }} />
      </head>
      <body>{children}</body>
    </html>
  );
}
