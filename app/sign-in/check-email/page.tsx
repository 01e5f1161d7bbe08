import type { Metadata } from "next";
import { AuthFrame, SignInLink } from "@/components/auth/auth-frame";

export const metadata: Metadata = { title: "Check your e-mail" };

export default function CheckEmailPage() {
  return (
    <AuthFrame title="Check your e-mail">
      <p className="text-sm text-basin-800">
        If that address belongs to a Spillway account, a sign-in link is on its way. It works once and expires in 24 hours.
      </p>
        <SignInLink>Back to sign-in</SignInLink>
    </AuthFrame>
  );
}
