import type { ComponentProps } from "react";
import type { WorkspaceRole } from "@/lib/auth/roles";
import { cn } from "./cn";

export type BadgeTone = "neutral" | "info" | "success" | "warning" | "danger";

const tones: Record<BadgeTone, string> = {
  neutral: "bg-basin-50 text-basin-700 ring-basin-200",
  info: "bg-basin-100 text-basin-800 ring-basin-300",
  success: "bg-emerald-50 text-emerald-800 ring-emerald-200",
  warning: "bg-spill-50 text-spill-800 ring-spill-200",
  danger: "bg-red-50 text-red-800 ring-red-200",
};

export interface BadgeProps extends ComponentProps<"span"> {
  tone?: BadgeTone;
}

export function Badge({ tone = "neutral", className, ...rest }: BadgeProps) {
  return (
    <span
      {...rest}
      className={cn(
        "inline-flex items-center gap-1 whitespace-nowrap rounded-md px-2 py-0.5 text-xs font-medium ring-1 ring-inset",
        tones[tone],
        className,
      )}
    />
  );
}

// Tied to the auth model so a new role fails type-checking here instead of rendering blank.
export type BadgeRole = WorkspaceRole;

// Each role gets its own tone so a members list can be scanned by colour, with the word always present.
const roleTone: Record<BadgeRole, BadgeTone> = {
  admin: "danger",
  engineer: "info",
  reviewer: "success",
  viewer: "neutral",
};

const roleLabel: Record<BadgeRole, string> = {
  admin: "Admin",
  engineer: "Engineer",
  reviewer: "Reviewer",
  viewer: "Viewer",
};

export interface RoleBadgeProps extends Omit<BadgeProps, "tone" | "children" | "role"> {
  role: BadgeRole;
}

export function RoleBadge({ role, ...rest }: RoleBadgeProps) {
  return (
    <Badge {...rest} tone={roleTone[role]}>
      {roleLabel[role]}
    </Badge>
  );
}
