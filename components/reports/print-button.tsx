"use client";

import { Button } from "@/components/ui";

/** Opens the browser's print dialog; hidden on paper. */
export function PrintButton() {
  return (
    <Button variant="primary" className="print:hidden" onClick={() => window.print()}>
      Print or save as PDF
    </Button>
  );
}
