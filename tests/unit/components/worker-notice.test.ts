// The run page's notice when no worker is alive (components/runs/worker-notice.tsx), rendered on the server.
import { createElement as h } from "react";
import { renderToStaticMarkup } from "react-dom/server";
import { describe, expect, it } from "vitest";
import { WorkerNotice } from "@/components/runs/worker-notice";
import { noLiveWorkerMessage } from "@/lib/jobs/worker-heartbeat";

describe("WorkerNotice", () => {
  it("shows the API's notice with what to do, as a note", () => {
    const markup = renderToStaticMarkup(h(WorkerNotice, { notice: noLiveWorkerMessage(30) }));
    expect(markup).toContain('role="note"');
    expect(markup).toContain("No worker is picking this run up");
    expect(markup).toContain("No background worker has reported in the last 30 s: queued runs wait until one starts.");
    expect(markup).toContain("<code>npm run worker</code>");
  });

  it("renders nothing when a worker is live (null) or the field is absent", () => {
    expect(renderToStaticMarkup(h(WorkerNotice, { notice: null }))).toBe("");
    expect(renderToStaticMarkup(h(WorkerNotice, { notice: undefined }))).toBe("");
  });
});
