import type { Metadata } from "next";
import type { ReactNode } from "react";
import "./globals.css";
import { inter } from "./fonts";
import { Providers } from "@/components/providers";

export const metadata: Metadata = {
  title: { default: "Spillway", template: "%s · Spillway" },
  description: "A lab for sizing loss systems when traffic breaks the Erlang assumptions.",
};

export default function RootLayout({ children }: { children: ReactNode }) {
  return (
    <html lang="en" className={inter.variable}>
      <body className="min-h-screen font-sans">
        <Providers>{children}</Providers>
      </body>
    </html>
  );
}
