import { redirect } from "next/navigation";
import { currentUser } from "@/lib/auth/guard";
import { getDatabase } from "@/db/client";
import { listWorkspacesForUser } from "@/db/queries/workspaces";
import { EmptyState } from "@/components/ui";
import { AuthFrame } from "@/components/auth/auth-frame";
import { SignOutButton } from "@/components/auth/sign-out-button";

export const dynamic = "force-dynamic";

export default async function Home() {
  const user = await currentUser();
  if (!user) redirect("/sign-in");
  const workspaces = await listWorkspacesForUser(getDatabase(), user.id);
  if (workspaces.length > 0) redirect(`/w/${workspaces[0].workspace.slug}`);
  return (
    <AuthFrame title="No workspace yet">
      <EmptyState
        title="You are not a member of any workspace"
        description="Ask a workspace admin to invite you; the invitation arrives by e-mail."
        action={<SignOutButton />}
      />
    </AuthFrame>
  );
}
