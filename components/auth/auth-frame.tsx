import Link from "next/link";
import type { ReactNode } from "react";
import { Card, CardBody } from "@/components/ui";

/** The narrow centred frame of the sign-in and invitation pages. */
export function AuthFrame({ title, subtitle, children }: { title: string; subtitle?: ReactNode; children: ReactNode }) {
  return (
    <main className="mx-auto flex min-h-screen max-w-md flex-col justify-center gap-6 px-4 py-12">
      <div>
        <p className="text-sm font-semibold tracking-wide text-spill-600 uppercase">Spillway</p>
        <h1 className="mt-1 text-2xl font-semibold text-basin-950">{title}</h1>
        {subtitle && <p className="mt-2 text-sm text-basin-700">{subtitle}</p>}
      </div>
      <Card>
        <CardBody>{children}</CardBody>
      </Card>
    </main>
  );
}

export function SignInLink({ children }: { children: ReactNode }) {
  return (
    <p className="mt-4 text-sm">
      <Link href="/sign-in" className="font-medium text-basin-700 underline">
        {children}
      </Link>
    </p>
  );
}
