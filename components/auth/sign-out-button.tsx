import { signOutAction } from "@/app/sign-in/actions";
import { Button } from "@/components/ui";

export function SignOutButton({ variant = "secondary" }: { variant?: "secondary" | "ghost" }) {
  return (
    <form action={signOutAction}>
      <Button type="submit" variant={variant} size="sm">
        Sign out
      </Button>
    </form>
  );
}
