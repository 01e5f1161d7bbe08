import type { Page } from "@playwright/test";
import path from "node:path";

/** Screenshots of key pages, kept as git-ignored artefacts of the journeys. */
export async function screenshot(page: Page, name: string) {
  await page.screenshot({ path: path.join(__dirname, "../../.output/screenshots", `${name}.png`), fullPage: true });
}
