import type { Metadata } from "next";
import { redirect } from "next/navigation";
import { currentUser } from "@/lib/auth/guard";
import { safeReturnPath } from "@/lib/auth/request-checks";
import { AuthFrame } from "@/components/auth/auth-frame";
import { SignInForms } from "@/components/auth/sign-in-forms";
import { Callout } from "@/components/ui";

export const metadata: Metadata = { title: "Sign in" };
export const dynamic = "force-dynamic";

const linkErrors: Record<string, string> = {
  Verification: "That sign-in link is not valid any more: it was already used or has expired. Ask for a new one.",
  AccessDenied: "That account cannot sign in.",
};

export default async function SignInPage({ searchParams }: { searchParams: Promise<Record<string, string | undefined>> }) {
  const params = await searchParams;
  const returnTo = safeReturnPath(params.returnTo);
  if (await currentUser()) redirect(returnTo);
  const error = params.error ? (linkErrors[params.error] ?? "Sign-in failed; please try again.") : null;
  return (
    <AuthFrame title="Sign in" subtitle="Size loss systems against the traffic you really have.">
      <div className="flex flex-col gap-4">
        {params.signedOut && <Callout tone="info" title="You are signed out." />}
        {error && (
          <Callout tone="danger" title="Sign-in link">
            {error}
          </Callout>
        )}
        <SignInForms returnTo={returnTo} />
      </div>
    </AuthFrame>
  );
}
