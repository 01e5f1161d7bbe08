import { Badge } from "@/components/ui";
import type { VerdictKind } from "@/lib/client/verdict";

const labels: Record<VerdictKind, { tone: "success" | "danger" | "warning"; text: string }> = {
  holds: { tone: "success", text: "Sizing holds" },
  breaks: { tone: "danger", text: "Sizing breaks" },
  undecided: { tone: "warning", text: "Too close to call" },
};

export function VerdictBadge({ kind }: { kind: VerdictKind }) {
  return (
    <Badge tone={labels[kind].tone} data-testid="verdict-badge">
      {labels[kind].text}
    </Badge>
  );
}
