import { Callout } from "@/components/ui";

/** Shown wherever a sizing protects people. */
export function SafetyCaution() {
  return (
    <Callout tone="warning" title="Safety-critical sizing">
      This workspace sizes capacity that protects people (for example emergency lines or hospital beds). Spillway&apos;s
      figures are models: they support, and never replace, the local regulations, clinical or operational standards
      and a qualified person&apos;s review that apply where you work.
    </Callout>
  );
}
