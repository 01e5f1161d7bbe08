import { Callout } from "@/components/ui";

/** The caution on every verdict and report that sizes emergency lines, beds or alarm circuits. */
export function SafetyNote() {
  return (
    <Callout tone="warning" title="This sizing protects people">
      These figures are model estimates with the statistical uncertainty stated beside them. Sizing decisions for
      emergency lines, beds or alarm circuits follow the regulations that apply where you work and a qualified
      person&apos;s review.
    </Callout>
  );
}
