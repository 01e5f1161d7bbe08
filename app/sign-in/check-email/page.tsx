import type { Metadata } from "next";
import Link from "next/link";
import { AuthFrame } from "@/components/auth/auth-frame";

export const metadata: Metadata = { title: "Check your e-mail" };

export default function CheckEmailPage() {
  return (
    <AuthFrame title="Check your e-mail">
      <p className="text-sm text-basin-800">
        If that address belongs to a Spillway account, a sign-in link is on its way. It works once and expires in 24 hours.
      </p>
      <p className="mt-4 text-sm">
        <Link href="/sign-in" className="font-medium text-basin-700 underline">
          Back to sign-in
        </Link>
      </p>
    </AuthFrame>
  );
}
